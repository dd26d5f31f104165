"use client";

import { formatDay } from "@/lib/dates";
import { useQuery } from "@tanstack/react-query";
import {
  createColumnHelper,
  flexRender,
  getCoreRowModel,
  getFilteredRowModel,
  getSortedRowModel,
  useReactTable,
  type ColumnFiltersState,
  type SortingState,
} from "@tanstack/react-table";
import Link from "next/link";
import { usePathname, useRouter, useSearchParams } from "next/navigation";
import { useMemo, useState } from "react";
import type { JobBoardRow } from "@/db/queries/jobs";
import type { JobStatus } from "@/db/schema";
import { JOB_STATUS_LABELS, JOB_STATUS_TONES } from "@/lib/labels";

const STATUSES = Object.keys(JOB_STATUS_LABELS) as JobStatus[];

async function fetchJobs(): Promise<JobBoardRow[]> {
  const res = await fetch("/api/jobs", { headers: { accept: "application/json" } });
  const body = (await res.json().catch(() => null)) as { jobs?: JobBoardRow[]; message?: string } | null;
  if (!res.ok || !body?.jobs) {
    throw new Error(body?.message ?? `The jobs could not be loaded (HTTP ${res.status}).`);
  }
  return body.jobs;
}

const col = createColumnHelper<JobBoardRow>();

function StatusBadge({ status }: { status: JobStatus }) {
  return (
    <span className={`inline-flex rounded-full px-2.5 py-1 text-xs font-semibold ${JOB_STATUS_TONES[status]}`}>
      {JOB_STATUS_LABELS[status]}
    </span>
  );
}

const formatDate = (iso: string | null) => formatDay(iso);

const columns = [
  col.accessor("number", {
    header: "Job",
    cell: (c) => (
      <Link href={`/jobs/${c.row.original.id}`} className="figure font-bold text-brass-dark underline-offset-2 hover:underline">
        {c.getValue()}
      </Link>
    ),
  }),
  col.accessor("customerName", { header: "Customer" }),
  col.accessor((r) => `${r.engineDescription} — ${r.headSummary}`, {
    id: "head",
    header: "Head",
    cell: (c) => (
      <div className="max-w-xs">
        <div className="truncate">{c.row.original.engineDescription}</div>
        <div className="text-sm text-stone-500">{c.row.original.headSummary}</div>
      </div>
    ),
  }),
  col.accessor("status", {
    header: "Status",
    cell: (c) => <StatusBadge status={c.getValue()} />,
    filterFn: "equalsString",
    sortingFn: (a, b) => STATUSES.indexOf(a.original.status) - STATUSES.indexOf(b.original.status),
  }),
  col.accessor((r) => r.technicianName ?? "", {
    id: "technician",
    header: "Technician",
    cell: (c) => c.getValue() || <span className="text-stone-400">Unassigned</span>,
    filterFn: (row, _id, value: string) => (row.original.technicianId ?? "") === value,
  }),
  col.accessor((r) => (r.seatCount ? r.seatsDone / r.seatCount : 0), {
    id: "progress",
    header: "Seats done",
    cell: (c) => (
      <span className="figure">
        {c.row.original.seatsDone}/{c.row.original.seatCount}
      </span>
    ),
  }),
  col.accessor((r) => r.promisedOn ?? "9999-12-31", {
    id: "promisedOn",
    header: "Promised",
    cell: (c) => <span className="figure">{formatDate(c.row.original.promisedOn)}</span>,
  }),
];

export function JobsBoard({ actorId, canBookIn = false }: { actorId: string; canBookIn?: boolean }) {
  const router = useRouter();
  const pathname = usePathname();
  const params = useSearchParams();
  const statusFilter = params.get("status") ?? "";
  const mine = params.get("mine") === "1";
  const technicianFilter = mine ? actorId : (params.get("technician") ?? "");
  const [search, setSearch] = useState("");
  // On a phone the filters fold away behind one button; from md up they are always shown.
  const [filtersOpen, setFiltersOpen] = useState(false);
  const [sorting, setSorting] = useState<SortingState>([{ id: "promisedOn", desc: false }]);

  const query = useQuery({ queryKey: ["jobs"], queryFn: fetchJobs });
  const data = useMemo(() => query.data ?? [], [query.data]);

  const technicians = useMemo(() => {
    const seen = new Map<string, string>();
    for (const j of data) if (j.technicianId && j.technicianName) seen.set(j.technicianId, j.technicianName);
    return [...seen.entries()].sort((a, b) => a[1].localeCompare(b[1]));
  }, [data]);

  const columnFilters = useMemo<ColumnFiltersState>(() => {
    const f: ColumnFiltersState = [];
    if (statusFilter) f.push({ id: "status", value: statusFilter });
    if (technicianFilter) f.push({ id: "technician", value: technicianFilter });
    return f;
  }, [statusFilter, technicianFilter]);

  const table = useReactTable({
    data,
    columns,
    state: { sorting, columnFilters, globalFilter: search },
    onSortingChange: setSorting,
    onGlobalFilterChange: setSearch,
    globalFilterFn: "includesString",
    getCoreRowModel: getCoreRowModel(),
    getSortedRowModel: getSortedRowModel(),
    getFilteredRowModel: getFilteredRowModel(),
  });

  const filtersActive = Boolean(search || statusFilter || technicianFilter);

  function setParam(key: string, value: string) {
    const next = new URLSearchParams(params.toString());
    if (key === "technician") next.delete("mine");
    if (value) next.set(key, value);
    else next.delete(key);
    const qs = next.toString();
    router.replace(qs ? `${pathname}?${qs}` : pathname, { scroll: false });
  }

  const rows = table.getRowModel().rows;

  return (
    <section aria-labelledby="board-heading" className="flex flex-col gap-4">
      <div className="flex flex-wrap items-end justify-between gap-3">
        <div>
          <h1 id="board-heading" className="text-2xl font-bold tracking-tight">
            {mine ? "My work" : statusFilter ? JOB_STATUS_LABELS[statusFilter as JobStatus] ?? "Jobs board" : "Jobs board"}
          </h1>
          <p className="text-stone-600">{mine ? "Heads assigned to you, soonest promised first." : "Every head in the shop, soonest promised first."}</p>
        </div>
        {canBookIn ? (
          <Link href="/jobs/new" className="inline-flex min-h-12 items-center rounded-lg bg-ink px-5 font-semibold text-white">
            Book in a job
          </Link>
        ) : null}
      </div>

      <button
        type="button"
        aria-expanded={filtersOpen}
        aria-controls="board-filters"
        onClick={() => setFiltersOpen((o) => !o)}
        className="flex min-h-12 items-center justify-between rounded-xl border border-stone-300 bg-white px-4 font-semibold md:hidden"
        data-testid="filters-toggle"
      >
        <span>
          Search and filters
          {filtersActive ? <span className="ml-2 rounded-full bg-amber-200 px-2 py-0.5 text-xs">{[search, statusFilter, technicianFilter].filter(Boolean).length} on</span> : null}
        </span>
        <span aria-hidden>{filtersOpen ? "▲" : "▼"}</span>
      </button>
      <div
        id="board-filters"
        className={`${filtersOpen ? "grid" : "hidden"} grid-cols-1 gap-3 rounded-xl border border-stone-300 bg-white p-3 sm:grid-cols-3 md:grid`}
      >
        <label className="flex flex-col gap-1 text-sm font-semibold">
          Search
          <input
            type="search"
            value={search}
            onChange={(e) => setSearch(e.target.value)}
            placeholder="Job, customer, engine…"
            className="min-h-12 rounded-lg border border-stone-400 px-3 text-base font-normal"
          />
        </label>
        <label className="flex flex-col gap-1 text-sm font-semibold">
          Status
          <select
            value={statusFilter}
            onChange={(e) => setParam("status", e.target.value)}
            className="min-h-12 rounded-lg border border-stone-400 bg-white px-3 text-base font-normal"
          >
            <option value="">All statuses</option>
            {STATUSES.map((s) => (
              <option key={s} value={s}>
                {JOB_STATUS_LABELS[s]}
              </option>
            ))}
          </select>
        </label>
        <label className="flex flex-col gap-1 text-sm font-semibold">
          Technician
          <select
            value={technicianFilter}
            onChange={(e) => setParam("technician", e.target.value)}
            className="min-h-12 rounded-lg border border-stone-400 bg-white px-3 text-base font-normal"
          >
            <option value="">Everyone</option>
            {technicians.map(([id, name]) => (
              <option key={id} value={id}>
                {id === actorId ? `${name} (me)` : name}
              </option>
            ))}
          </select>
        </label>
      </div>

      {query.isPending ? (
        <div aria-busy="true" aria-label="Loading jobs" className="flex flex-col gap-2" data-testid="jobs-loading">
          {[0, 1, 2].map((i) => (
            <div key={i} className="h-16 animate-pulse rounded-xl bg-stone-200" />
          ))}
        </div>
      ) : query.isError ? (
        <div role="alert" className="rounded-xl border border-rose-300 bg-rose-50 p-4 text-rose-900">
          <p className="font-semibold">The jobs board could not be loaded.</p>
          <p className="text-sm">{query.error.message}</p>
          <button
            type="button"
            onClick={() => void query.refetch()}
            className="mt-3 min-h-12 rounded-lg bg-ink px-4 font-semibold text-white"
          >
            Try again
          </button>
        </div>
      ) : data.length === 0 ? (
        <div className="rounded-xl border border-dashed border-stone-400 p-8 text-center" data-testid="jobs-empty">
          <p className="text-lg font-semibold">No jobs yet</p>
          <p className="text-stone-600">When a head comes in for work, its job appears here.</p>
        </div>
      ) : rows.length === 0 && mine && !search && !statusFilter ? (
        <div className="rounded-xl border border-dashed border-stone-400 p-8 text-center" data-testid="jobs-none-mine">
          <p className="text-lg font-semibold">Nothing assigned to you</p>
          <p className="text-stone-600">A supervisor assigns heads to technicians when they are booked in.</p>
          <Link href="/jobs" className="mt-3 inline-flex min-h-12 items-center rounded-lg border border-stone-400 px-4 font-semibold">
            See every job in the shop
          </Link>
        </div>
      ) : rows.length === 0 ? (
        <div className="rounded-xl border border-dashed border-stone-400 p-8 text-center" data-testid="jobs-none-match">
          <p className="text-lg font-semibold">No jobs match these filters</p>
          {filtersActive ? (
            <button
              type="button"
              className="mt-3 min-h-12 rounded-lg border border-stone-400 px-4 font-semibold"
              onClick={() => {
                setSearch("");
                router.replace(pathname, { scroll: false });
              }}
            >
              Clear filters
            </button>
          ) : null}
        </div>
      ) : (
        <>
          <div className="hidden overflow-x-auto rounded-xl border border-stone-300 bg-white md:block">
            <table className="w-full text-left" data-testid="jobs-table">
              <thead className="bg-stone-100 text-sm">
                {table.getHeaderGroups().map((hg) => (
                  <tr key={hg.id}>
                    {hg.headers.map((h) => {
                      const sorted = h.column.getIsSorted();
                      return (
                        <th
                          key={h.id}
                          scope="col"
                          aria-sort={sorted === "asc" ? "ascending" : sorted === "desc" ? "descending" : "none"}
                          className="px-3 py-2"
                        >
                          <button
                            type="button"
                            onClick={h.column.getToggleSortingHandler()}
                            className="flex min-h-11 items-center gap-1 font-semibold"
                          >
                            {flexRender(h.column.columnDef.header, h.getContext())}
                            <span aria-hidden className="text-stone-400">
                              {sorted === "asc" ? "▲" : sorted === "desc" ? "▼" : "↕"}
                            </span>
                          </button>
                        </th>
                      );
                    })}
                  </tr>
                ))}
              </thead>
              <tbody>
                {rows.map((row) => (
                  <tr key={row.id} className="border-t border-stone-200 align-top hover:bg-amber-50">
                    {row.getVisibleCells().map((cell) => (
                      <td key={cell.id} className="px-3 py-3">
                        {flexRender(cell.column.columnDef.cell, cell.getContext())}
                      </td>
                    ))}
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
          <ul className="flex flex-col gap-2 md:hidden" data-testid="jobs-cards">
            {rows.map((row) => {
              const j = row.original;
              return (
                <li key={row.id}>
                  <Link
                    href={`/jobs/${j.id}`}
                    className="block rounded-xl border border-stone-300 bg-white p-4 active:bg-amber-50"
                  >
                    <div className="flex items-center justify-between gap-2">
                      <span className="figure text-lg font-bold text-brass-dark">{j.number}</span>
                      <StatusBadge status={j.status} />
                    </div>
                    <div className="mt-1 font-semibold">{j.customerName}</div>
                    <div className="text-sm text-stone-600">{j.headSummary}</div>
                    <div className="mt-2 flex justify-between text-sm">
                      <span>{j.technicianName ?? "Unassigned"}</span>
                      <span className="figure">
                        {j.seatsDone}/{j.seatCount} seats · {formatDate(j.promisedOn)}
                      </span>
                    </div>
                  </Link>
                </li>
              );
            })}
          </ul>
          <p className="text-sm text-stone-500" aria-live="polite">
            Showing {rows.length} of {data.length} jobs
          </p>
        </>
      )}
    </section>
  );
}

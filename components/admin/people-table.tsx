"use client";

import {
  createColumnHelper,
  flexRender,
  getCoreRowModel,
  getFilteredRowModel,
  useReactTable,
  type ColumnFiltersState,
  type FilterFn,
} from "@tanstack/react-table";
import { Fragment, useMemo, useState } from "react";
import type { PersonRow } from "@/db/queries/users";
import type { UserRole } from "@/db/schema";
import { ROLE_LABELS } from "@/lib/auth/roles";
import { ROLES } from "@/lib/validations/auth";
import { PersonRowActions } from "./person-row-actions";

const field = "min-h-11 rounded-lg border border-stone-400 bg-white px-3 text-base";

/** A person as the table shows them; the last sign-in is written on the server in the shop's time zone. */
export type PeopleTableRow = PersonRow & { lastSignInLabel: string | null };

const col = createColumnHelper<PeopleTableRow>();

/** Name or e-mail contains the typed text, ignoring case. */
const nameOrEmail: FilterFn<PeopleTableRow> = (row, _id, value: string) => {
  const q = value.trim().toLowerCase();
  if (!q) return true;
  return (
    row.original.name.toLowerCase().includes(q) || row.original.email.toLowerCase().includes(q)
  );
};

export function PeopleTable({ people, selfId }: { people: PeopleTableRow[]; selfId: string }) {
  const [text, setText] = useState("");
  const [role, setRole] = useState<"" | UserRole>("");
  const [status, setStatus] = useState<"" | "active" | "inactive">("");
  const [open, setOpen] = useState<string | null>(null);

  const columns = useMemo(
    () => [
      col.accessor("name", {
        header: "Name",
        filterFn: nameOrEmail,
        cell: (c) => (
          <span className="font-semibold">
            {c.getValue()}
            {c.row.original.id === selfId ? (
              <span className="font-normal text-stone-500"> (you)</span>
            ) : null}
          </span>
        ),
      }),
      col.accessor("email", {
        header: "E-mail",
        cell: (c) => <span className="break-all text-stone-700">{c.getValue()}</span>,
      }),
      col.accessor("role", {
        header: "Role",
        filterFn: "equalsString",
        cell: (c) => ROLE_LABELS[c.getValue()],
      }),
      col.accessor((r) => (r.active ? "active" : "inactive"), {
        id: "status",
        header: "Status",
        filterFn: "equalsString",
        cell: (c) => (
          <span className="flex flex-wrap gap-1">
            {c.row.original.active ? (
              <span className="rounded-full bg-emerald-100 px-2 py-0.5 text-sm font-semibold text-emerald-900">
                Active
              </span>
            ) : (
              <span className="rounded-full bg-stone-200 px-2 py-0.5 text-sm font-semibold text-stone-800">
                Inactive (left)
              </span>
            )}
            {c.row.original.locked ? (
              <span className="rounded-full bg-rose-100 px-2 py-0.5 text-sm font-semibold text-rose-900">
                Locked
              </span>
            ) : null}
          </span>
        ),
      }),
      col.accessor("lastSignInAt", {
        header: "Last sign-in",
        cell: (c) => {
          const v = c.getValue();
          return v ? (
            <time dateTime={v}>{c.row.original.lastSignInLabel}</time>
          ) : (
            <span className="text-stone-500">Never</span>
          );
        },
      }),
    ],
    [selfId],
  );

  const columnFilters: ColumnFiltersState = useMemo(
    () => [
      ...(text.trim() ? [{ id: "name", value: text }] : []),
      ...(role ? [{ id: "role", value: role }] : []),
      ...(status ? [{ id: "status", value: status }] : []),
    ],
    [text, role, status],
  );

  const table = useReactTable({
    data: people,
    columns,
    state: { columnFilters },
    getRowId: (r) => r.id,
    getCoreRowModel: getCoreRowModel(),
    getFilteredRowModel: getFilteredRowModel(),
  });
  const rows = table.getRowModel().rows;

  return (
    <div className="flex flex-col gap-3">
      <div className="flex flex-wrap items-end gap-3" role="search" aria-label="Filter people">
        <label className="flex flex-col gap-1 text-sm font-semibold">
          Name or e-mail
          <input
            type="search"
            value={text}
            onChange={(e) => setText(e.target.value)}
            className={field}
            placeholder="Type to narrow"
          />
        </label>
        <label className="flex flex-col gap-1 text-sm font-semibold">
          Role
          <select
            value={role}
            onChange={(e) => setRole(e.target.value as "" | UserRole)}
            className={field}
          >
            <option value="">All roles</option>
            {ROLES.map((r) => (
              <option key={r} value={r}>
                {ROLE_LABELS[r]}
              </option>
            ))}
          </select>
        </label>
        <label className="flex flex-col gap-1 text-sm font-semibold">
          Status
          <select
            value={status}
            onChange={(e) => setStatus(e.target.value as "" | "active" | "inactive")}
            className={field}
          >
            <option value="">Everyone</option>
            <option value="active">Active</option>
            <option value="inactive">Inactive</option>
          </select>
        </label>
        <p className="pb-2 text-sm text-stone-600" aria-live="polite" data-testid="people-count">
          Showing {rows.length} of {people.length}
        </p>
      </div>
      <div className="overflow-x-auto rounded-xl border border-stone-300 bg-white">
        <table className="w-full text-left text-sm" data-testid="people-table">
          <thead className="bg-stone-100">
            {table.getHeaderGroups().map((hg) => (
              <tr key={hg.id}>
                {hg.headers.map((h) => (
                  <th key={h.id} scope="col" className="px-3 py-2 font-semibold">
                    {flexRender(h.column.columnDef.header, h.getContext())}
                  </th>
                ))}
                <th scope="col" className="px-3 py-2">
                  <span className="sr-only">Actions</span>
                </th>
              </tr>
            ))}
          </thead>
          <tbody>
            {rows.length === 0 ? (
              <tr>
                <td colSpan={6} className="px-3 py-6 text-center text-stone-600">
                  Nobody matches the filter.
                </td>
              </tr>
            ) : null}
            {rows.map((row) => {
              const p = row.original;
              const expanded = open === p.id;
              return (
                <Fragment key={row.id}>
                  <tr
                    className={`border-t border-stone-200 ${p.active ? "" : "text-stone-500"}`}
                    data-person={p.email}
                  >
                    {row.getVisibleCells().map((cell) => (
                      <td key={cell.id} className="px-3 py-2 align-middle">
                        {flexRender(cell.column.columnDef.cell, cell.getContext())}
                      </td>
                    ))}
                    <td className="px-3 py-1 text-right">
                      <button
                        type="button"
                        aria-expanded={expanded}
                        aria-controls={`person-${p.id}`}
                        aria-label={`${expanded ? "Close" : "Manage"} ${p.name}`}
                        onClick={() => setOpen(expanded ? null : p.id)}
                        className="min-h-11 min-w-11 rounded-lg border border-stone-500 px-3 font-semibold"
                      >
                        {expanded ? "Close" : "Manage"}
                      </button>
                    </td>
                  </tr>
                  {expanded ? (
                    <tr id={`person-${p.id}`} className="bg-stone-50">
                      <td colSpan={6} className="px-3 py-3">
                        <PersonRowActions person={p} isSelf={p.id === selfId} />
                      </td>
                    </tr>
                  ) : null}
                </Fragment>
              );
            })}
          </tbody>
        </table>
      </div>
    </div>
  );
}

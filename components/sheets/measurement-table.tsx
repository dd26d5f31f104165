"use client";

import {
  createColumnHelper,
  flexRender,
  getCoreRowModel,
  getFilteredRowModel,
  getSortedRowModel,
  useReactTable,
  type SortingState,
} from "@tanstack/react-table";
import { useState } from "react";
import type { MeasurementRow } from "@/lib/heads/sheets";

const col = createColumnHelper<MeasurementRow>();
const unitOf = (r: MeasurementRow) => (r.kind === "spring_load" ? "N" : "mm");
const fmt = (v: number | null, r: MeasurementRow) => (v === null ? "—" : r.kind === "spring_load" ? v.toFixed(0) : v.toFixed(3));

const VERDICT_TEXT: Record<string, string> = {
  within_spec: "Within spec",
  tight: "Tight",
  loose: "Loose",
  beyond_limit: "Beyond limit",
  below: "Below spec",
  above: "Above spec",
  off_scale: "Off scale (not a clearance)",
};

const columns = [
  col.accessor("label", { header: "Measurement" }),
  col.accessor("where", {
    header: "Where",
    // Seat codes in the monospace font, so 2I1 never reads as 2l1.
    cell: (c) => (c.row.original.whereIsSeat ? <span className="figure font-semibold">{c.getValue()}</span> : c.getValue()),
  }),
  col.accessor("valueSi", { header: "Value", cell: (c) => <span className="figure">{fmt(c.getValue(), c.row.original)} {unitOf(c.row.original)}</span> }),
  col.accessor((r) => `${fmt(r.specMin, r)}–${fmt(r.specMax, r)}`, {
    id: "spec",
    header: "Specification",
    cell: (c) => (
      <span className="figure">
        {c.getValue()}
        {c.row.original.specSource ? <span className="block text-xs text-stone-500">{c.row.original.specSource.replace("_", " ")}</span> : null}
      </span>
    ),
  }),
  col.accessor((r) => r.verdict ?? "", { id: "verdict", header: "Result", cell: (c) => VERDICT_TEXT[c.getValue()] ?? "Not judged" }),
  col.accessor("method", { header: "Method", cell: (c) => c.getValue() ?? "" }),
];

export function MeasurementTable({ rows }: { rows: MeasurementRow[] }) {
  const [sorting, setSorting] = useState<SortingState>([]);
  const [filter, setFilter] = useState("");
  const table = useReactTable({
    data: rows,
    columns,
    state: { sorting, globalFilter: filter },
    onSortingChange: setSorting,
    onGlobalFilterChange: setFilter,
    globalFilterFn: "includesString",
    getCoreRowModel: getCoreRowModel(),
    getSortedRowModel: getSortedRowModel(),
    getFilteredRowModel: getFilteredRowModel(),
  });
  if (rows.length === 0) return <p className="rounded-xl border border-dashed border-stone-400 p-6 text-center">No measurements recorded yet.</p>;
  return (
    <div className="flex flex-col gap-2">
      <label className="flex flex-col gap-1 text-sm font-semibold sm:w-72">
        Filter
        <input type="search" value={filter} onChange={(e) => setFilter(e.target.value)} placeholder="Seat, kind, result…" className="min-h-12 rounded-lg border border-stone-400 px-3 font-normal" />
      </label>
      <div className="overflow-x-auto rounded-xl border border-stone-300 bg-white">
        <table className="w-full text-left text-sm" data-testid="measurement-table">
          <thead className="bg-stone-100">
            {table.getHeaderGroups().map((hg) => (
              <tr key={hg.id}>
                {hg.headers.map((h) => (
                  <th key={h.id} scope="col" className="px-3 py-2" aria-sort={h.column.getIsSorted() === "asc" ? "ascending" : h.column.getIsSorted() === "desc" ? "descending" : "none"}>
                    <button type="button" onClick={h.column.getToggleSortingHandler()} className="min-h-10 font-semibold">
                      {flexRender(h.column.columnDef.header, h.getContext())} {h.column.getIsSorted() === "asc" ? "▲" : h.column.getIsSorted() === "desc" ? "▼" : ""}
                    </button>
                  </th>
                ))}
              </tr>
            ))}
          </thead>
          <tbody>
            {table.getRowModel().rows.map((r) => (
              <tr key={r.id} className="border-t border-stone-200">
                {r.getVisibleCells().map((c) => (
                  <td key={c.id} className="px-3 py-2">
                    {flexRender(c.column.columnDef.cell, c.getContext())}
                  </td>
                ))}
              </tr>
            ))}
          </tbody>
        </table>
      </div>
    </div>
  );
}

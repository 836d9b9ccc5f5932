"use client";
// Usage by person and by ensemble: sortable tables and a bar plot of charged + held per person.
// Sorted in the browser: an allocation has tens of people and at most 500 ensembles listed, all
// sent with the page, so a server round trip per sort would only add latency.
import Link from "next/link";
import { useState } from "react";
import { createColumnHelper, flexRender, getCoreRowModel, getSortedRowModel, useReactTable, type ColumnDef, type SortingState } from "@tanstack/react-table";
import { Bar, BarChart, CartesianGrid, Legend, ResponsiveContainer, Tooltip, XAxis, YAxis } from "recharts";
import type { EnsembleRow, PersonRow } from "@/lib/allocations/usage";
import { coreHours } from "@/lib/format";

function SortTable<T>({ data, columns, testId, initial }: { data: T[]; columns: ColumnDef<T, any>[]; testId: string; initial: SortingState }) {
  const [sorting, setSorting] = useState<SortingState>(initial);
  const table = useReactTable({ data, columns, state: { sorting }, onSortingChange: setSorting, getCoreRowModel: getCoreRowModel(), getSortedRowModel: getSortedRowModel() });
  return (
    <table className="data" data-testid={testId}>
      <thead>{table.getHeaderGroups().map((g) => (
        <tr key={g.id}>{g.headers.map((h) => {
          const s = h.column.getIsSorted();
          const numeric = (h.column.columnDef.meta as { numeric?: boolean } | undefined)?.numeric;
          return (
            <th key={h.id} className={numeric ? "n" : ""} aria-sort={s ? (s === "desc" ? "descending" : "ascending") : undefined}>
              <button type="button" onClick={h.column.getToggleSortingHandler()} className="uppercase tracking-wide hover:text-ink">
                {flexRender(h.column.columnDef.header, h.getContext())}<span aria-hidden className="ml-1 text-ink-faint">{s === "asc" ? "▲" : s === "desc" ? "▼" : "↕"}</span>
              </button>
            </th>
          );
        })}</tr>
      ))}</thead>
      <tbody>{table.getRowModel().rows.map((r) => (
        <tr key={r.id}>{r.getVisibleCells().map((c) => {
          const numeric = (c.column.columnDef.meta as { numeric?: boolean } | undefined)?.numeric;
          return <td key={c.id} className={numeric ? "n" : ""}>{flexRender(c.column.columnDef.cell, c.getContext())}</td>;
        })}</tr>
      ))}</tbody>
    </table>
  );
}

const p = createColumnHelper<PersonRow>();
const num = { meta: { numeric: true }, cell: (c: { getValue: () => unknown }) => coreHours(Number(c.getValue())) };
const personColumns = [
  p.accessor("name", { header: "Person", cell: (c) => <span>{c.getValue()}<span className="block text-xxs text-ink-faint">{c.row.original.email}</span></span> }),
  p.accessor("charged", { header: "Charged", ...num }),
  p.accessor("held", { header: "Held", ...num }),
  p.accessor("used", { header: "Used or held", ...num }),
  p.accessor((r) => r.cap ?? Infinity, {
    id: "cap", header: "Cap", meta: { numeric: true },
    cell: (c) => (c.row.original.cap === null ? <span className="text-ink-faint">none</span> : <span title={c.row.original.capRule ?? ""}>{coreHours(c.row.original.cap)}</span>),
  }),
  p.accessor((r) => (r.cap ? r.used / r.cap : 0), {
    id: "ofCap", header: "Of cap", meta: { numeric: true },
    cell: (c) => (c.row.original.cap ? <span className={c.getValue() >= 0.8 ? "text-danger font-medium" : ""}>{(100 * c.getValue()).toFixed(0)} %{c.getValue() >= 0.8 ? " ⚠" : ""}</span> : "—"),
  }),
];
const e = createColumnHelper<EnsembleRow>();
const ensembleColumns = [
  e.accessor("name", { header: "Ensemble", cell: (c) => <Link href={`/ensembles/${c.row.original.ensembleId}`} className="text-accent-strong hover:underline">{c.getValue()}</Link> }),
  e.accessor("owner", { header: "Owner" }),
  e.accessor("state", { header: "State" }),
  e.accessor("reserved", { header: "Reserved", ...num }),
  e.accessor("charged", { header: "Charged", ...num }),
  e.accessor("held", { header: "Held", ...num }),
];

type BarRow = { name: string; charged: number; held: number };

/** Charged and held core-hours as stacked horizontal bars, one a row. */
function UsageBars({ data, label, testId, rowHeight }: { data: BarRow[]; label: string; testId: string; rowHeight: number }) {
  return (
    <figure aria-label={label} data-testid={testId}>
      <ResponsiveContainer width="100%" height={Math.max(140, rowHeight * data.length + 48)}>
        <BarChart data={data} layout="vertical" margin={{ top: 4, right: 16, bottom: 4, left: 8 }}>
          <CartesianGrid stroke="#e1e4e6" strokeDasharray="3 3" horizontal={false} />
          <XAxis type="number" tick={{ fontSize: 11 }} tickFormatter={(v: number) => coreHours(v)} />
          <YAxis type="category" dataKey="name" width={150} tick={{ fontSize: 11 }} />
          <Tooltip formatter={(v, n) => [`${coreHours(Number(v))} core-h`, n]} />
          <Legend wrapperStyle={{ fontSize: 12 }} />
          <Bar dataKey="charged" stackId="u" fill="#0f6b6b" name="charged" isAnimationActive={false} />
          <Bar dataKey="held" stackId="u" fill="#56B4E9" name="held" isAnimationActive={false} />
        </BarChart>
      </ResponsiveContainer>
    </figure>
  );
}

/** Per-person table and plot. */
export function PersonUsage({ rows }: { rows: PersonRow[] }) {
  if (rows.length === 0) return <p className="text-sm text-ink-soft">Nobody has used this allocation yet.</p>;
  const plot = rows.filter((r) => r.used > 0 || r.cap).map((r) => ({ name: r.name, charged: r.charged, held: r.held }));
  return (
    <div className="grid xl:grid-cols-[minmax(0,3fr)_minmax(0,2fr)] gap-4 items-start">
      <div className="min-w-0 overflow-x-auto"><SortTable data={rows} columns={personColumns} testId="usage-by-person" initial={[{ id: "used", desc: true }]} /></div>
      <UsageBars data={plot} label="core-hours by person" testId="person-plot" rowHeight={36} />
    </div>
  );
}

/** Per-ensemble table and plot. */
export function EnsembleUsage({ rows }: { rows: EnsembleRow[] }) {
  if (rows.length === 0) return <p className="text-sm text-ink-soft">No ensemble has reserved on this allocation yet.</p>;
  // the plot shows the twelve largest; the table lists them all
  const plot = [...rows].sort((x, y) => y.charged + y.held - (x.charged + x.held)).slice(0, 12).map((r) => ({ name: r.name, charged: r.charged, held: r.held }));
  return (
    <div className="grid xl:grid-cols-[minmax(0,3fr)_minmax(0,2fr)] gap-4 items-start">
      <div className="min-w-0 overflow-x-auto"><SortTable data={rows} columns={ensembleColumns} testId="usage-by-ensemble" initial={[{ id: "charged", desc: true }]} /></div>
      <UsageBars data={plot} label="core-hours by ensemble" testId="ensemble-plot" rowHeight={30} />
    </div>
  );
}

"use client";
import Link from "next/link";
import { useMemo } from "react";
import { createColumnHelper, flexRender, getCoreRowModel, useReactTable, type SortingState } from "@tanstack/react-table";
import { useEnsembles, type EnsembleRow } from "@/lib/hooks/use-ensembles";
import { useUrlParams } from "@/lib/hooks/use-url-params";
import { coreHoursFine as coreHours } from "./core-hours";
import { StateBadge } from "@/components/ui/state-badge";
import { Time } from "@/components/ui/time";
import { Pagination } from "@/components/ui/pagination";
import { EnsembleFilters, type FilterOptions } from "./ensemble-filters";
import { RunMix } from "./run-mix";
import { EmptyEnsembles } from "./empty-ensembles";

const KEYS = ["state", "sampler", "owner", "tag", "sort", "order", "page", "pageSize"] as const;
const col = createColumnHelper<EnsembleRow>();

const columns = [
  col.accessor("name", {
    header: "Ensemble",
    cell: (c) => (
      <div>
        <Link href={`/ensembles/${c.row.original.id}`} className="font-medium text-accent-strong hover:underline">{c.getValue()}</Link>
        <div className="mono text-xxs text-ink-faint">{c.row.original.id.slice(0, 8)}</div>
      </div>
    ),
  }),
  col.accessor("state", { header: "State", cell: (c) => <StateBadge state={c.getValue()} /> }),
  col.accessor((r) => r.sampler?.name ?? "", { id: "sampler", header: "Sampler", cell: (c) => <span>{c.getValue()} <span className="text-ink-faint text-xs">{c.row.original.sampler?.version}</span></span> }),
  col.accessor((r) => r.owner?.name ?? "", { id: "owner", header: "Owner" }),
  col.accessor("tags", {
    header: "Tags", enableSorting: false,
    cell: (c) => <span className="flex flex-wrap gap-1">{c.getValue().map((t) => <span key={t} className="rounded bg-paper-sunken px-1.5 text-xs">{t}</span>)}</span>,
  }),
  col.accessor((r) => r.runs.total, { id: "runs", header: "Runs", cell: (c) => <RunMix counts={c.row.original.runs} total={c.getValue()} /> }),
  col.accessor("reservedCoreHours", { header: "Reserved", meta: { numeric: true }, cell: (c) => <span className="num">{coreHours(c.getValue())}</span> }),
  col.accessor("createdAt", { header: "Submitted", cell: (c) => <span className="text-xs"><Time at={c.getValue()} /></span> }),
];

/** The ensembles table: server-side sort, filters and pages, all kept in the URL. */
export function EnsemblesTable({ options }: { options: FilterOptions }) {
  const { values, set, query } = useUrlParams(KEYS);
  const { data, error, isPending, isFetching } = useEnsembles(query);
  const sorting: SortingState = useMemo(() => (values.sort ? [{ id: values.sort, desc: values.order === "desc" }] : [{ id: "createdAt", desc: true }]), [values.sort, values.order]);
  const table = useReactTable({
    data: data?.data ?? [],
    columns,
    getCoreRowModel: getCoreRowModel(),
    manualSorting: true,
    manualPagination: true,
    manualFiltering: true,
    rowCount: data?.total ?? 0,
    state: { sorting },
    onSortingChange: (updater) => {
      const next = typeof updater === "function" ? updater(sorting) : updater;
      set({ sort: next[0]?.id ?? null, order: next[0] ? (next[0].desc ? "desc" : "asc") : null });
    },
    enableSortingRemoval: false,
  });
  const filtered = Boolean(values.state || values.sampler || values.owner || values.tag);
  if (data && data.total === 0 && !filtered) return <EmptyEnsembles />;
  return (
    <div>
      <EnsembleFilters values={values} options={options} onChange={set} busy={isFetching} />
      {error ? <p role="alert" className="text-sm text-danger my-3">Could not load the ensembles: {error.message}. Reload the page; if it persists, tell an admin.</p> : null}
      <table className="data" data-testid="ensembles" aria-busy={isPending}>
        <thead>
          {table.getHeaderGroups().map((g) => (
            <tr key={g.id}>
              {g.headers.map((h) => {
                const sorted = h.column.getIsSorted();
                const numeric = (h.column.columnDef.meta as { numeric?: boolean } | undefined)?.numeric;
                return (
                  <th key={h.id} className={numeric ? "n" : ""} aria-sort={sorted ? (sorted === "desc" ? "descending" : "ascending") : undefined}>
                    {h.column.getCanSort() ? (
                      <button type="button" onClick={h.column.getToggleSortingHandler()} className="uppercase tracking-wide hover:text-ink">
                        {flexRender(h.column.columnDef.header, h.getContext())}
                        <span aria-hidden className="ml-1 text-ink-faint">{sorted === "asc" ? "▲" : sorted === "desc" ? "▼" : "↕"}</span>
                      </button>
                    ) : flexRender(h.column.columnDef.header, h.getContext())}
                  </th>
                );
              })}
            </tr>
          ))}
        </thead>
        <tbody>
          {table.getRowModel().rows.map((r) => (
            <tr key={r.id} data-ensemble={r.original.id}>
              {r.getVisibleCells().map((c) => {
                const numeric = (c.column.columnDef.meta as { numeric?: boolean } | undefined)?.numeric;
                return <td key={c.id} className={numeric ? "n" : ""}>{flexRender(c.column.columnDef.cell, c.getContext())}</td>;
              })}
            </tr>
          ))}
          {data && data.data.length === 0 ? <tr><td colSpan={columns.length} className="text-center text-ink-soft py-6">No ensemble matches these filters. <button type="button" className="text-accent underline" onClick={() => set({ state: null, sampler: null, owner: null, tag: null })}>Clear the filters</button></td></tr> : null}
          {isPending ? <tr><td colSpan={columns.length} className="text-ink-soft py-6">Loading ensembles…</td></tr> : null}
        </tbody>
      </table>
      {data ? <Pagination page={data.page} pageSize={data.pageSize} total={data.total} onPage={(p) => set({ page: p })} onPageSize={(n) => set({ pageSize: n, page: null })} /> : null}
    </div>
  );
}

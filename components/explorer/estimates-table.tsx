"use client";
import { useMemo } from "react";
import { flexRender, getCoreRowModel, useReactTable, type SortingState, type VisibilityState } from "@tanstack/react-table";
import type { ExplorerPage } from "@/lib/hooks/use-explorer";
import { Pagination } from "@/components/ui/pagination";
import { COUNT_CAP } from "@/lib/explorer/count-cap";
import { BASE_COLUMNS, DEFAULT_VISIBLE, paramColumn } from "./table-columns";
import { ColumnChooser, useHiddenColumns } from "./column-chooser";

// keepCase: headers with Greek letters, which the uppercase header style would turn into look-alike Latin capitals (τ → Τ, χ → Χ)
type Meta = { numeric?: boolean; param?: boolean; keepCase?: boolean } | undefined;

// accessor-key columns carry their key, not an id, until the table resolves them
const colId = (c: { id?: string }) => c.id ?? (c as { accessorKey?: string }).accessorKey ?? "";

/** The estimates table: sorting and pages are the server's, read from and written to the URL. */
export function ExplorerTable({ data, params, get, set, isPending, onClear, toolbar }: {
  data: ExplorerPage | undefined; params: string[]; get: (k: string) => string; set: (c: Record<string, string | number | null>) => void;
  isPending: boolean; onClear: () => void; toolbar?: React.ReactNode;
}) {
  const columns = useMemo(() => [...BASE_COLUMNS, ...params.map(paramColumn)], [params]);
  const { hidden, toggle } = useHiddenColumns(BASE_COLUMNS.map(colId).filter((id) => !DEFAULT_VISIBLE.includes(id)));
  const columnVisibility: VisibilityState = useMemo(() => Object.fromEntries(hidden.map((h) => [h, false])), [hidden]);
  const sorting: SortingState = useMemo(() => [{ id: get("sort") || "createdAt", desc: (get("dir") || (get("sort") ? "asc" : "desc")) === "desc" }], [get]);
  const table = useReactTable({
    data: data?.rows ?? [], columns, getCoreRowModel: getCoreRowModel(),
    manualSorting: true, manualPagination: true, manualFiltering: true, rowCount: data?.total ?? 0,
    state: { sorting, columnVisibility }, enableSortingRemoval: false,
    onSortingChange: (u) => {
      const next = typeof u === "function" ? u(sorting) : u;
      set({ sort: next[0]?.id ?? null, dir: next[0] ? (next[0].desc ? "desc" : "asc") : null });
    },
  });
  const visible = table.getVisibleLeafColumns().length;
  return (
    <div>
      <div className="flex items-center justify-end gap-2 mb-2">
        {toolbar}
        <ColumnChooser columns={columns.map((c) => ({ id: colId(c), label: typeof c.header === "string" ? c.header : colId(c) }))} hidden={hidden} onToggle={toggle} />
      </div>
      <div className="overflow-x-auto">
        <table className="data" data-testid="explorer-table" aria-busy={isPending}>
          <thead>
            {table.getHeaderGroups().map((g) => (
              <tr key={g.id}>
                {g.headers.map((h) => {
                  const s = h.column.getIsSorted();
                  const meta = h.column.columnDef.meta as Meta;
                  return (
                    <th key={h.id} className={`${meta?.numeric ? "n" : ""} ${meta?.param ? "normal-case mono" : meta?.keepCase ? "normal-case" : ""}`} aria-sort={s ? (s === "desc" ? "descending" : "ascending") : undefined}>
                      {h.column.getCanSort() ? (
                        <button type="button" onClick={h.column.getToggleSortingHandler()} className={`${meta?.param || meta?.keepCase ? "" : "uppercase"} tracking-wide hover:text-ink`}>
                          {flexRender(h.column.columnDef.header, h.getContext())}
                          <span aria-hidden className="ml-1 text-ink-faint">{s === "asc" ? "▲" : s === "desc" ? "▼" : "↕"}</span>
                        </button>
                      ) : <span className={meta?.keepCase ? "normal-case" : ""}>{flexRender(h.column.columnDef.header, h.getContext())}</span>}
                    </th>
                  );
                })}
              </tr>
            ))}
          </thead>
          <tbody>
            {table.getRowModel().rows.map((r) => (
              <tr key={r.original.estimateId} data-estimate={r.original.estimateId} data-observable={r.original.observable}>
                {r.getVisibleCells().map((c) => <td key={c.id} className={(c.column.columnDef.meta as Meta)?.numeric ? "n" : ""}>{flexRender(c.column.columnDef.cell, c.getContext())}</td>)}
              </tr>
            ))}
            {data && data.rows.length === 0 ? <tr><td colSpan={visible} className="text-center text-ink-soft py-6">No estimate matches these filters. <button type="button" className="text-accent underline" onClick={onClear}>Clear the filters</button></td></tr> : null}
            {isPending ? <tr><td colSpan={visible} className="text-ink-soft py-6">Loading estimates…</td></tr> : null}
          </tbody>
        </table>
      </div>
      {data ? <Pagination page={data.page} pageSize={data.pageSize} total={data.total} onPage={(p) => set({ page: p })} onPageSize={(n) => set({ pageSize: n, page: null })} /> : null}
      {data?.totalEstimated ? (
        <p className="pt-1 text-xs text-ink-soft" data-testid="count-estimated">
          About {data.total.toLocaleString("en-GB")} estimates match: beyond {COUNT_CAP.toLocaleString("en-GB")} the count is the database&apos;s estimate, not an exact count. Narrow the filters for an exact one.
        </p>
      ) : null}
    </div>
  );
}

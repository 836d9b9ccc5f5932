"use client";
import Link from "next/link";
import { createColumnHelper, type ColumnDef } from "@tanstack/react-table";
import type { ExplorerRow } from "@/lib/hooks/use-explorer";
import { concise, formatPlain } from "@/lib/format";
import { Time } from "@/components/ui/time";

const col = createColumnHelper<ExplorerRow>();
const fmt = (v: unknown) => (typeof v === "number" ? formatPlain(v, 6) : v === undefined || v === null ? "—" : String(v));
const tau = (r: ExplorerRow) => (r.tauInt === null ? "—" : r.tauIntError ? concise(r.tauInt, r.tauIntError) : formatPlain(r.tauInt, 4));

// eslint-disable-next-line @typescript-eslint/no-explicit-any -- each column has its own value type (the library's own advice)
type Col = ColumnDef<ExplorerRow, any>;

/** Fixed columns; ids equal the API's sort column names where the server can sort by them. */
export const BASE_COLUMNS: Col[] = [
  col.accessor("observable", { header: "Observable", cell: (c) => <span className="mono">{c.getValue()}</span> }),
  col.accessor("mean", {
    header: "Estimate", meta: { numeric: true },
    cell: (c) => <span className="font-medium" title={`mean ${c.row.original.mean} ± ${c.row.original.error}`} data-testid="estimate">{concise(c.row.original.mean, c.row.original.error)}</span>,
  }),
  col.accessor("tauInt", { header: "τ_int", meta: { numeric: true, keepCase: true }, cell: (c) => <span data-testid="tau" title={c.row.original.scope === "point" ? (c.row.original.tauInt === null ? "no τ_int: at least one replica's analysis gave none (see scope: single runs)" : "N-weighted mean of the replicas' τ_int (each run's own: scope single runs)") : undefined}>{tau(c.row.original)}</span> }),
  col.accessor("error", { header: "Error", meta: { numeric: true }, cell: (c) => formatPlain(c.getValue() as number, 3) }),
  col.accessor("n", { header: "N", meta: { numeric: true }, cell: (c) => (c.getValue() as number).toLocaleString("en-GB") }),
  col.accessor((r) => r.ensemble.name, {
    id: "ensemble", header: "Ensemble",
    cell: (c) => <Link className="text-accent-strong hover:underline whitespace-nowrap" href={`/ensembles/${c.row.original.ensemble.id}`}>{c.getValue() as string}</Link>,
  }),
  col.accessor((r) => r.sampler.name, { id: "sampler", header: "Sampler", enableSorting: false }),
  col.accessor((r) => r.owner.name, { id: "owner", header: "Owner", enableSorting: false }),
  col.accessor((r) => r.chi2dof, { id: "chi2dof", header: "χ²/dof", enableSorting: false, meta: { numeric: true, keepCase: true }, cell: (c) => <span className={c.row.original.flagged ? "text-danger font-medium" : ""} title={c.row.original.flagged ? "replicas disagree (p < 0.01)" : ""}>{c.getValue() === null ? "—" : formatPlain(c.getValue() as number, 3)}{c.row.original.flagged ? " ⚑" : ""}</span> }),
  col.accessor((r) => r.runId, {
    id: "run", header: "Run", enableSorting: false,
    cell: (c) => (c.row.original.runId ? <Link className="mono text-xs text-accent hover:underline" href={`/runs/${c.row.original.runId}/analysis`} style={{ whiteSpace: "nowrap" }}>{c.row.original.runId.slice(0, 8)} · r{c.row.original.replica}</Link> : <span className="text-xs text-ink-faint whitespace-nowrap">point #{c.row.original.pointIndex}</span>),
  }),
  col.accessor((r) => r.analysisVersion, { id: "analysis", header: "Analysis", enableSorting: false, cell: (c) => <span className="text-xs text-ink-soft">{c.row.original.method} v{c.row.original.analysisVersion} · est. v{c.row.original.version}</span> }),
  col.accessor("createdAt", { header: "Computed", cell: (c) => <span className="text-xs"><Time at={c.getValue() as string} /></span> }),
];

/** A column per parameter, sortable on the server as "param:<name>". */
export function paramColumn(name: string): Col {
  return col.accessor((r) => r.params[name], { id: `param:${name}`, header: name, meta: { numeric: true, param: true }, cell: (c) => <span className="num">{fmt(c.getValue())}</span> });
}

/** What a new visitor sees before choosing columns. */
export const DEFAULT_VISIBLE = ["observable", "mean", "tauInt", "n", "ensemble", "chi2dof", "run", "params"];

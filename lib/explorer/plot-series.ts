import "server-only";
// Data behind an explorer plot: an observable against a parameter, one line per ensemble or per
// value of a second parameter, with error bars and (for point estimates) the replicas behind each point.
import { QueryTypes } from "sequelize";
import type { Identity } from "@/lib/auth/identity";
import { AppError } from "@/lib/errors";
import { db } from "@/models";
import { checkParamNames } from "./build-query";
import { PARAM_NAME, type ExplorerQuery } from "./query";
import { allEstimates, type ExplorerRow } from "./query-estimates";

/** x parameter and line grouping of a plot. */
export type PlotSpec = { x: string; groupBy: "ensemble" | `param:${string}` };
export type PlotPoint = { x: number; mean: number; error: number; tauInt: number | null; estimateId: string; runs?: { x: number; mean: number; error: number; runId: string }[] };
export type PlotLine = { key: string; label: string; points: PlotPoint[] };
/** What the plot route returns; `skipped` counts rows whose x is not a number. */
export type PlotData = { series: PlotLine[]; observable: string; x: string; groupBy: string; skipped: number; truncated: boolean; rows: ExplorerRow[] };

/** Most estimates one plot reads; beyond it the plot says it is truncated. */
export const PLOT_LIMIT = 20_000;

/** Parse x and groupBy (from URL params or an object), refusing anything but whitelisted names. */
export function parsePlotSpec(input: URLSearchParams | Record<string, unknown>): PlotSpec {
  const get = (k: string) => (input instanceof URLSearchParams ? input.get(k) : (input[k] as string | undefined)) ?? undefined;
  const x = get("x");
  const groupBy = get("groupBy") ?? "ensemble";
  const issues = [];
  if (!x || !PARAM_NAME.test(x)) issues.push({ path: "x", message: "must name a parameter (letters, digits, _)" });
  if (groupBy !== "ensemble" && !(groupBy.startsWith("param:") && PARAM_NAME.test(groupBy.slice(6)))) {
    issues.push({ path: "groupBy", message: 'must be "ensemble" or "param:<name>"' });
  }
  if (issues.length) throw new AppError("invalid", `plot is invalid: ${issues.map((i) => `${i.path} ${i.message}`).join("; ")}`, { issues });
  return { x: x!, groupBy: groupBy as PlotSpec["groupBy"] };
}

const keyOf = (v: unknown) => JSON.stringify(v ?? null);

/** Lines of the plot of `q` (its observable) against parameter `x`, grouped as asked; points sorted by x. */
export async function plotSeries(who: Identity, q: ExplorerQuery & PlotSpec): Promise<PlotData> {
  if (!q.observable) throw new AppError("invalid", "plot: choose an observable (one quantity per plot)", { issues: [{ path: "observable", message: "is required for a plot" }] });
  const groupParam = q.groupBy.startsWith("param:") ? q.groupBy.slice(6) : null;
  await checkParamNames([q.x, ...(groupParam ? [groupParam] : [])], "plot");
  const { rows, truncated } = await allEstimates(who, { ...q, sort: { column: `param:${q.x}`, dir: "asc" } }, PLOT_LIMIT);
  const lines = new Map<string, PlotLine>();
  let skipped = 0;
  const used: ExplorerRow[] = [];
  for (const r of rows) {
    const x = r.params[q.x];
    if (typeof x !== "number") { skipped++; continue; }
    const key = groupParam ? keyOf(r.params[groupParam]) : r.ensemble.id;
    const label = groupParam ? `${groupParam} = ${r.params[groupParam] ?? "—"}` : r.ensemble.name;
    if (!lines.has(key)) lines.set(key, { key, label, points: [] });
    lines.get(key)!.points.push({ x, mean: r.mean, error: r.error, tauInt: r.tauInt, estimateId: r.estimateId });
    used.push(r);
  }
  if (q.scope === "point" && used.length) await attachReplicas(lines, used, q.observable);
  const series = [...lines.values()].sort((a, b) => (a.label < b.label ? -1 : a.label > b.label ? 1 : 0));
  return { series, observable: q.observable, x: q.x, groupBy: q.groupBy, skipped, truncated, rows: used };
}

/** Per-replica points: the current run estimates of the same observable at each plotted point. */
async function attachReplicas(lines: Map<string, PlotLine>, used: ExplorerRow[], observable: string): Promise<void> {
  const pointOf = new Map(used.map((r) => [r.estimateId, r.pointId]));
  const runs = await db().sequelize.query<{ point_id: string; run_id: string; mean: number; error: number }>(
    `SELECT point_id, run_id, mean, error FROM estimates WHERE scope = 'run' AND is_current AND observable = $1 AND point_id = ANY($2::uuid[])
      ORDER BY point_id, run_id`,
    { type: QueryTypes.SELECT, bind: [observable, [...new Set(pointOf.values())]] },
  );
  const byPoint = new Map<string, typeof runs>();
  for (const r of runs) byPoint.set(r.point_id, [...(byPoint.get(r.point_id) ?? []), r]);
  for (const line of lines.values()) {
    for (const p of line.points) {
      p.runs = (byPoint.get(pointOf.get(p.estimateId)!) ?? []).map((r) => ({ x: p.x, mean: Number(r.mean), error: Number(r.error), runId: r.run_id }));
    }
  }
}

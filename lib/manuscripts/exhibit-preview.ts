import "server-only";
// A small preview of an exhibit for its manuscript's page: how much lies beneath it (estimates, runs, files) and
// the points of its plot. A frozen exhibit is read from its snapshot; a draft from what its query selects today.
import { modelsFor } from "@/lib/db/models-for";
import type { ExhibitSnapshot } from "@/lib/provenance/prov-for";
import { exhibitExplorerHref } from "./exhibit-link";
import { selectExhibitEstimates, type ExhibitQuery } from "./exhibit-query";

/** One plotted line of a preview. */
export type PreviewSeries = { key: string; label: string; points: { x: number; mean: number; error: number }[] };
/** What an exhibit's card shows before anyone opens the explorer. */
export type ExhibitPreview = {
  from: "snapshot" | "current"; estimates: number; runs: number; files: number | null; bytes: number | null;
  observables: string[]; x: string | null; series: PreviewSeries[]; pointsLeftOut: number; explorerHref: string;
};

/** Points drawn in a preview at most; the explorer shows the rest. */
export const PREVIEW_POINTS = 400;

type Est = { observable: string; mean: number; error: number; params: Record<string, unknown>; runId: string | null };

function seriesOf(rows: Est[], x: string | null, groupBy: string | undefined): { series: PreviewSeries[]; left: number } {
  if (!x) return { series: [], left: 0 };
  const by = groupBy?.startsWith("param:") ? groupBy.slice(6) : null;
  const lines = new Map<string, PreviewSeries>();
  let left = 0;
  for (const r of rows) {
    const xv = r.params[x];
    if (typeof xv !== "number" || !Number.isFinite(r.mean)) { left++; continue; }
    const g = by ? `${by}=${String(r.params[by])}` : "";
    const key = `${r.observable}${g ? ` · ${g}` : ""}`;
    const line = lines.get(key) ?? { key, label: key, points: [] };
    if ([...lines.values()].reduce((n, l) => n + l.points.length, 0) >= PREVIEW_POINTS) { left++; continue; }
    line.points.push({ x: xv, mean: r.mean, error: r.error });
    lines.set(key, line);
  }
  for (const l of lines.values()) l.points.sort((a, b) => a.x - b.x);
  return { series: [...lines.values()], left };
}

/** The preview of one exhibit of a manuscript of group `groupId`. */
export async function exhibitPreview(groupId: string, ex: { query: Record<string, unknown>; snapshot: ExhibitSnapshot | null }): Promise<ExhibitPreview> {
  const q = ex.query as ExhibitQuery & Record<string, unknown>;
  const x = q.x ?? null;
  const explorerHref = exhibitExplorerHref(q);
  if (ex.snapshot) {
    const s = ex.snapshot;
    const { series, left } = seriesOf(s.estimates, x, q.groupBy);
    return {
      from: "snapshot", estimates: s.estimates.length, runs: s.runs.length, files: s.files.length, bytes: s.files.reduce((n, f) => n + f.bytes, 0),
      observables: [...new Set(s.estimates.map((e) => e.observable))], x, series, pointsLeftOut: left, explorerHref,
    };
  }
  let ids: string[] = [];
  try { ids = await selectExhibitEstimates(groupId, q); } catch { /* a query the database refuses previews as empty; freezing names the problem */ }
  const rows = ids.length ? ((await modelsFor().sequelize.query(
    `SELECT observable, mean, error, params, run_id AS "runId" FROM estimates WHERE id = ANY($1) LIMIT ${PREVIEW_POINTS * 2}`,
    { bind: [ids], type: "SELECT" })) as Est[]) : [];
  const { series, left } = seriesOf(rows, x, q.groupBy);
  const runs = q.scope === "run" ? new Set(rows.map((r) => r.runId)).size : 0;
  return { from: "current", estimates: ids.length, runs, files: null, bytes: null, observables: [...new Set(rows.map((r) => r.observable))], x, series, pointsLeftOut: left + Math.max(0, ids.length - rows.length), explorerHref };
}

import "server-only";
// The explorer's estimates table: current estimates matching a query, within the caller's group scope.
import { QueryTypes } from "sequelize";
import type { Identity } from "@/lib/auth/identity";
import { db } from "@/models";
import { allIds, buildEstimateQuery, pageIds, type BuiltQuery } from "./build-query";
import { COUNT_CAP } from "./count-cap";
import type { ExplorerQuery } from "./query";

/** One row of the explorer table (and of its exports). */
export type ExplorerRow = {
  estimateId: string; scope: "run" | "point"; observable: string; mean: number; error: number; tauInt: number | null;
  tauIntError: number | null; n: number; thermCut: number; window: number | null; method: string; analysisVersion: string;
  version: number; chi2dof: number | null; flagged: boolean; params: Record<string, unknown>; createdAt: string;
  ensemble: { id: string; name: string; tags: string[] }; sampler: { name: string; version: string };
  owner: { id: string; name: string }; groupId: string; pointId: string; pointIndex: number; runId: string | null; replica: number | null;
};

/**
 * A page of rows and the count of all matching rows: exact up to COUNT_CAP; beyond it `total` is the
 * planner's estimate from table statistics (`totalEstimated`; the UI says "about N").
 */
export type ExplorerPage = { rows: ExplorerRow[]; total: number; page: number; pageSize: number; totalCapped: boolean; totalEstimated: boolean };

export { COUNT_CAP };

const SELECT = `SELECT es.id, es.scope, es.observable, es.mean, es.error, es.tau_int, es.tau_int_error, es.n, es.therm_cut, es."window",
  es.method, es.analysis_version, es.version, es.chi2dof, es.flagged, es.params, es.created_at, es.ensemble_id, e.name AS ensemble_name,
  e.tags, s.name AS sampler_name, s.version AS sampler_version, e.owner_id, u.name AS owner_name, e.group_id, es.point_id, p.point_index,
  es.run_id, r.replica`;

const num = (v: unknown) => (v === null || v === undefined ? null : Number(v));

function toRow(r: Record<string, unknown>): ExplorerRow {
  return {
    estimateId: r.id as string, scope: r.scope as "run" | "point", observable: r.observable as string, mean: Number(r.mean), error: Number(r.error),
    tauInt: num(r.tau_int), tauIntError: num(r.tau_int_error), n: Number(r.n), thermCut: Number(r.therm_cut), window: num(r.window),
    method: r.method as string, analysisVersion: r.analysis_version as string, version: Number(r.version), chi2dof: num(r.chi2dof),
    flagged: Boolean(r.flagged), params: r.params as Record<string, unknown>, createdAt: new Date(r.created_at as string).toISOString(),
    ensemble: { id: r.ensemble_id as string, name: r.ensemble_name as string, tags: r.tags as string[] },
    sampler: { name: r.sampler_name as string, version: r.sampler_version as string }, owner: { id: r.owner_id as string, name: r.owner_name as string },
    groupId: r.group_id as string, pointId: r.point_id as string, pointIndex: Number(r.point_index), runId: (r.run_id as string) ?? null, replica: num(r.replica),
  };
}

/** Display columns of the given estimates, in the order of `ids` (at most a page or an export's worth). */
async function rowsOf(ids: string[]): Promise<ExplorerRow[]> {
  if (ids.length === 0) return [];
  const rows = await db().sequelize.query<Record<string, unknown>>(
    `${SELECT} FROM unnest($1::uuid[]) WITH ORDINALITY AS page(id, ord) JOIN estimates es ON es.id = page.id
      JOIN ensembles e ON e.id = es.ensemble_id JOIN samplers s ON s.id = e.sampler_id JOIN users u ON u.id = e.owner_id
      JOIN parameter_points p ON p.id = es.point_id LEFT JOIN runs r ON r.id = es.run_id ORDER BY page.ord`,
    { type: QueryTypes.SELECT, bind: [ids] },
  );
  return rows.map(toRow);
}

/** The planner's row estimate for the query's WHERE (EXPLAIN only plans; nothing is read). */
async function estimatedCount(b: BuiltQuery): Promise<number> {
  const [plan] = await db().sequelize.query<{ "QUERY PLAN": [{ Plan: { "Plan Rows": number } }] }>(
    `EXPLAIN (FORMAT JSON) SELECT 1 FROM explorer.estimate_rows x WHERE ${b.where}`, { type: QueryTypes.SELECT, bind: b.whereBind });
  return Math.round(plan["QUERY PLAN"][0].Plan["Plan Rows"]);
}

/** Two significant figures: an estimate should not look exact. */
const roughly = (n: number) => { const k = 10 ** Math.max(0, Math.floor(Math.log10(Math.max(1, n))) - 1); return Math.round(n / k) * k; };

/**
 * Matching rows: when the planner expects far more than COUNT_CAP the exact count is skipped (it
 * would be capped anyway and costs a scan of the matches); otherwise counted exactly up to the cap.
 */
async function countRows(b: BuiltQuery, cap: number): Promise<{ total: number; totalCapped: boolean; totalEstimated: boolean }> {
  const estimate = await estimatedCount(b);
  if (estimate > 5 * cap) return { total: roughly(estimate), totalCapped: true, totalEstimated: true };
  const [{ total }] = await db().sequelize.query<{ total: string }>(
    `SELECT count(*) AS total FROM (SELECT 1 FROM explorer.estimate_rows x WHERE ${b.where} LIMIT ${Math.trunc(cap) + 1}) c`, { type: QueryTypes.SELECT, bind: b.whereBind });
  if (Number(total) <= cap) return { total: Number(total), totalCapped: false, totalEstimated: false };
  return { total: roughly(Math.max(estimate, cap + 1)), totalCapped: true, totalEstimated: true };
}

/** One page of current estimates matching `q` that `who` may read, in the query's order. */
export async function queryEstimates(who: Identity, q: ExplorerQuery, options: { countCap?: number } = {}): Promise<ExplorerPage> {
  const b = await buildEstimateQuery(who, q);
  const [count, ids] = await Promise.all([countRows(b, options.countCap ?? COUNT_CAP), pageIds(b, (q.page - 1) * q.pageSize, q.pageSize)]);
  return { rows: await rowsOf(ids), ...count, page: q.page, pageSize: q.pageSize };
}

/** Every matching row (up to `limit`) in the table's order: what exports and plots read. */
export async function allEstimates(who: Identity, q: ExplorerQuery, limit: number): Promise<{ rows: ExplorerRow[]; truncated: boolean }> {
  const ids = await allIds(await buildEstimateQuery(who, q), limit + 1);
  return { rows: await rowsOf(ids.slice(0, limit)), truncated: ids.length > limit };
}

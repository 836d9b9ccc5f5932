import "server-only";
// The explorer's estimates table: current estimates matching a query, within the caller's group scope.
import { QueryTypes } from "sequelize";
import type { Identity } from "@/lib/auth/identity";
import { db } from "@/models";
import { buildEstimateQuery } from "./build-query";
import type { ExplorerQuery } from "./query";

/** One row of the explorer table (and of its exports). */
export type ExplorerRow = {
  estimateId: string; scope: "run" | "point"; observable: string; mean: number; error: number; tauInt: number | null;
  tauIntError: number | null; n: number; thermCut: number; window: number | null; method: string; analysisVersion: string;
  version: number; chi2dof: number | null; flagged: boolean; params: Record<string, unknown>; createdAt: string;
  ensemble: { id: string; name: string; tags: string[] }; sampler: { name: string; version: string };
  owner: { id: string; name: string }; groupId: string; pointId: string; pointIndex: number; runId: string | null; replica: number | null;
};

/** A page of rows and the total count. */
export type ExplorerPage = { rows: ExplorerRow[]; total: number; page: number; pageSize: number; totalCapped: boolean };

/** Counting stops here: an exact count of a huge result costs a full scan (bench/explorer-scale.ts), a pager needs no more. */
export const COUNT_CAP = 10_000;

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

/** One page of current estimates matching `q` that `who` may read, in the query's order. */
export async function queryEstimates(who: Identity, q: ExplorerQuery): Promise<ExplorerPage> {
  const b = await buildEstimateQuery(who, q);
  const { sequelize } = db();
  const [{ total }] = await sequelize.query<{ total: string }>(`SELECT count(*) AS total FROM (SELECT 1 ${b.from} ${b.where} LIMIT ${COUNT_CAP + 1}) c`,
    { type: QueryTypes.SELECT, bind: b.whereBind });
  const rows = await sequelize.query<Record<string, unknown>>(
    `${SELECT} ${b.from} ${b.where} ${b.orderBy} LIMIT ${q.pageSize} OFFSET ${(q.page - 1) * q.pageSize}`,
    { type: QueryTypes.SELECT, bind: b.bind },
  );
  return { rows: rows.map(toRow), total: Math.min(Number(total), COUNT_CAP), totalCapped: Number(total) > COUNT_CAP, page: q.page, pageSize: q.pageSize };
}

/** Every matching row (up to `limit`) in the table's order: what exports and plots read. */
export async function allEstimates(who: Identity, q: ExplorerQuery, limit: number): Promise<{ rows: ExplorerRow[]; truncated: boolean }> {
  const b = await buildEstimateQuery(who, q);
  const rows = await db().sequelize.query<Record<string, unknown>>(`${SELECT} ${b.from} ${b.where} ${b.orderBy} LIMIT ${limit + 1}`,
    { type: QueryTypes.SELECT, bind: b.bind });
  return { rows: rows.slice(0, limit).map(toRow), truncated: rows.length > limit };
}

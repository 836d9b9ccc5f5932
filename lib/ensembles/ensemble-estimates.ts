import "server-only";
// An ensemble's current estimates (per point, or per run), as JSON rows or CSV with full precision.
import { QueryTypes } from "sequelize";
import { db } from "@/models";

/** One estimate row as exported. */
export type EstimateRow = {
  scope: "point" | "run"; pointIndex: number; params: Record<string, unknown>; runId: string | null; replica: number | null; seed: string | null;
  observable: string; mean: number; error: number; tauInt: number | null; tauIntError: number | null; n: number; thermCut: number;
  window: number | null; method: string; analysisVersion: string; chi2dof: number | null; flagged: boolean;
};

/** Current estimates of an ensemble, ordered by point, replica and observable. */
export async function ensembleEstimates(ensembleId: string, scope: "point" | "run" = "point"): Promise<EstimateRow[]> {
  const rows = await db().sequelize.query<Record<string, unknown>>(
    `SELECT es.scope, p.point_index, p.params, es.run_id, r.replica, r.seed, es.observable, es.mean, es.error, es.tau_int, es.tau_int_error,
            es.n, es.therm_cut, es."window", es.method, es.analysis_version, es.chi2dof, es.flagged
       FROM estimates es JOIN parameter_points p ON p.id = es.point_id LEFT JOIN runs r ON r.id = es.run_id
      WHERE es.ensemble_id = $1 AND es.scope = $2 AND es.is_current
      ORDER BY p.point_index, r.replica NULLS FIRST, es.observable`,
    { type: QueryTypes.SELECT, bind: [ensembleId, scope] },
  );
  const num = (v: unknown) => (v === null || v === undefined ? null : Number(v));
  return rows.map((r) => ({
    scope: r.scope as "point" | "run", pointIndex: Number(r.point_index), params: r.params as Record<string, unknown>,
    runId: (r.run_id as string) ?? null, replica: num(r.replica), seed: (r.seed as string) ?? null, observable: r.observable as string,
    mean: Number(r.mean), error: Number(r.error), tauInt: num(r.tau_int), tauIntError: num(r.tau_int_error), n: Number(r.n),
    thermCut: Number(r.therm_cut), window: num(r.window), method: r.method as string, analysisVersion: r.analysis_version as string,
    chi2dof: num(r.chi2dof), flagged: Boolean(r.flagged),
  }));
}

const cell = (v: unknown): string => {
  if (v === null || v === undefined) return "";
  const s = typeof v === "number" ? String(v) : typeof v === "string" ? v : JSON.stringify(v); // String(x) round-trips a double
  return /[",\n\r]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
};

/** CSV (RFC 4180) of estimate rows: one column per parameter, then the estimate's fields. */
export function estimatesCsv(rows: EstimateRow[]): string {
  const paramKeys = [...new Set(rows.flatMap((r) => Object.keys(r.params)))].sort();
  const head = ["point", ...paramKeys, "run_id", "replica", "seed", "observable", "mean", "error", "tau_int", "tau_int_error", "n", "therm_cut", "window", "method", "analysis_version", "chi2dof", "flagged"];
  const lines = rows.map((r) => [r.pointIndex, ...paramKeys.map((k) => r.params[k]), r.runId, r.replica, r.seed, r.observable, r.mean, r.error, r.tauInt,
    r.tauIntError, r.n, r.thermCut, r.window, r.method, r.analysisVersion, r.chi2dof, r.flagged].map(cell).join(","));
  return [head.map(cell).join(","), ...lines].join("\r\n") + "\r\n";
}

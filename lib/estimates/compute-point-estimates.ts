import "server-only";
// Per-point estimates: the current run estimates of a point's finished replicas, combined by inverse variance.
import type { Transaction } from "sequelize";
import { AnalysisError, ANALYSIS_VERSION, combineReplicas } from "@/lib/analysis";
import { modelsFor } from "@/lib/db/models-for";
import { AppError } from "@/lib/errors";
import type { Estimate } from "@/models/estimate";
import type { EstimateProblem } from "./compute-run-estimates";
import { combineTauInt } from "./combine-tau-int";
import { writeEstimateVersions, type NewEstimate } from "./write-estimates";

/** Options of {@link computePointEstimates}. */
export type PointEstimatesOptions = { transaction?: Transaction };

/** What {@link computePointEstimates} stored; `unchanged` lists observables whose combination did not move. */
export type PointEstimatesResult = { estimates: Estimate[]; unchanged: string[]; problems: EstimateProblem[] };

type RunRow = { observable: string; mean: number; error: number; n: number; therm_cut: number; run_id: string; tau_int: number | null; tau_int_error: number | null };

/**
 * For each observable, combine the current run estimates of the point's finished replicas — runs
 * that are done, or collecting with an accepted import (the run being imported in the caller's
 * transaction, or one whose move to done is still under way when a sibling imports) — with
 * combineReplicas: weighted mean, error scaled by sqrt(max(1, χ²/dof)) (PDG convention, so a
 * scatter beyond the error bars widens them), chi2dof, and flagged when p < 0.01. A combination
 * equal to the current point estimate is not stored again, so calling this twice is harmless.
 * τ_int is the replicas' N-weighted mean (combineTauInt), none when a replica has none.
 */
export async function computePointEstimates(pointId: string, options: PointEstimatesOptions = {}): Promise<PointEstimatesResult> {
  if (!options.transaction) return modelsFor().sequelize.transaction((transaction) => computePointEstimates(pointId, { ...options, transaction }));
  const transaction = options.transaction;
  const m = modelsFor(transaction);
  const point = await m.ParameterPoint.findByPk(pointId, { transaction, lock: transaction.LOCK.NO_KEY_UPDATE });
  if (!point) throw new AppError("not_found", `parameter point ${pointId} does not exist`);
  const inputs = (await m.sequelize.query(
    `SELECT e.observable, e.mean, e.error, e.n, e.therm_cut, e.run_id, e.tau_int, e.tau_int_error FROM estimates e JOIN runs r ON r.id = e.run_id
      WHERE e.scope = 'run' AND e.point_id = $1 AND e.is_current
        AND (r.state = 'done' OR (r.state = 'collecting' AND EXISTS (SELECT 1 FROM imports i WHERE i.run_id = r.id AND i.state = 'accepted')))
      ORDER BY e.observable, r.replica`,
    { bind: [pointId], transaction, type: "SELECT" },
  )) as RunRow[];
  const current = await m.Estimate.findAll({ where: { scope: "point", pointId, isCurrent: true }, transaction });
  const currentBy = new Map(current.map((e) => [e.observable, e]));

  const byObservable = new Map<string, RunRow[]>();
  for (const r of inputs) byObservable.set(r.observable, [...(byObservable.get(r.observable) ?? []), r]);
  const rows: NewEstimate[] = [];
  const unchanged: string[] = [];
  const problems: EstimateProblem[] = [];
  for (const [observable, replicas] of byObservable) {
    let c;
    try {
      c = combineReplicas(replicas.map((r) => ({ mean: r.mean, error: r.error })));
    } catch (err) {
      if (!(err instanceof AnalysisError)) throw err;
      problems.push({ observable, reason: err.message });
      continue;
    }
    const tau = combineTauInt(replicas.map((r) => ({ tauInt: r.tau_int === null ? null : Number(r.tau_int), tauIntError: r.tau_int_error === null ? null : Number(r.tau_int_error), n: Number(r.n) })));
    const next: NewEstimate = {
      pointId, ensembleId: point.ensembleId, observable, mean: c.mean, error: c.scaledError, tauInt: tau.tauInt, tauIntError: tau.tauIntError,
      // Each replica made its own cut; the largest is the most a replica discarded.
      thermCut: Math.max(...replicas.map((r) => r.therm_cut)), n: replicas.reduce((a, r) => a + r.n, 0), window: null,
      method: c.method, analysisVersion: ANALYSIS_VERSION, chi2dof: c.chi2PerDof, flagged: c.disagree, params: point.params,
    };
    const now = currentBy.get(observable);
    if (now && now.mean === next.mean && now.error === next.error && now.n === next.n && now.method === next.method && now.flagged === next.flagged && now.tauInt === next.tauInt) {
      unchanged.push(observable);
      continue;
    }
    rows.push(next);
  }
  const estimates = await writeEstimateVersions("point", pointId, rows, transaction);
  return { estimates, unchanged, problems };
}

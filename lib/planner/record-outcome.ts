import "server-only";
// When an ensemble that followed a prediction ends: compare each point's achieved error with the
// prediction for the measurements it actually kept, and store the comparison (planner_outcomes).
import type { Transaction } from "sequelize";
import { modelsFor } from "@/lib/db/models-for";
import { log } from "@/lib/log";
import { canonicalJson } from "@/lib/spec/spec-hash";
import type { OutcomePoint } from "./list-record";
import { planIdsOf } from "./plan-tag";
import type { Plan } from "./types";

type EnsembleLike = { id: string; tags: string[]; groupId: string; ownerId: string; state: string; spec: Record<string, unknown> };
type PointRow = { params: Record<string, unknown>; error: number; n: number; run_errors: number[]; run_ns: number[] };

/**
 * Record the outcome of every prediction `ensemble` names by tag (see plan-tag.ts), in a savepoint
 * of the caller's transaction: a fault here is logged and rolled back alone, never undoing the end
 * of the run that closed the ensemble. Only predictions made by the ensemble's owner are linked.
 * The prediction at a point is sqrt(2·tau_int·variance / n) with n the measurements the point's
 * replicas kept after their cuts, so the comparison tests tau_int × variance, not the cut allowance.
 */
export async function recordPlanOutcomes(ensemble: EnsembleLike, options: { transaction: Transaction }): Promise<number> {
  const ids = planIdsOf(ensemble.tags);
  if (!ids.length || ensemble.state === "cancelled") return 0;
  const { sequelize } = modelsFor(options.transaction);
  try {
    return await sequelize.transaction({ transaction: options.transaction }, async (transaction) => {
      let recorded = 0;
      for (const id of ids) if (await recordOne(ensemble, id, transaction)) recorded++;
      return recorded;
    });
  } catch (err) {
    log.error({ err, ensembleId: ensemble.id }, "planner outcome not recorded");
    return 0;
  }
}

async function recordOne(ensemble: EnsembleLike, predictionId: string, transaction: Transaction): Promise<boolean> {
  const { sequelize } = modelsFor(transaction);
  const [prediction] = (await sequelize.query(
    `SELECT id, user_id, observable, target_error, plan FROM planner_predictions WHERE id = $1`, { bind: [predictionId], transaction, type: "SELECT" },
  )) as { id: string; user_id: string; observable: string; target_error: number; plan: Plan }[];
  if (!prediction || prediction.user_id !== ensemble.ownerId) return false;
  const plan = prediction.plan;
  const interval = Number(ensemble.spec.interval ?? 1);
  const planned = new Map(plan.points.map((p) => [canonicalJson(p.params), p]));
  const rows = (await sequelize.query(
    `SELECT pp.params, pe.error, pe.n,
            array_agg(re.error ORDER BY re.run_id) AS run_errors, array_agg(re.n ORDER BY re.run_id) AS run_ns
       FROM estimates pe
       JOIN parameter_points pp ON pp.id = pe.point_id
       JOIN estimates re ON re.point_id = pe.point_id AND re.scope = 'run' AND re.is_current AND re.observable = pe.observable
       JOIN runs r ON r.id = re.run_id AND r.state = 'done'
      WHERE pe.ensemble_id = $1 AND pe.scope = 'point' AND pe.is_current AND pe.observable = $2
      GROUP BY pp.params, pe.error, pe.n`,
    { bind: [ensemble.id, prediction.observable], transaction, type: "SELECT" },
  )) as PointRow[];

  const points: OutcomePoint[] = [];
  for (const r of rows) {
    const p = planned.get(canonicalJson(r.params));
    if (!p) continue;
    // tau_int from the plan's interval to this ensemble's, through sweeps (as the plan did)
    const tau = Math.max(0.5, (p.tauInt * plan.request.interval) / interval);
    const n = r.run_ns.reduce((a, b) => a + Number(b), 0);
    const predictedError = Math.sqrt((2 * tau * p.variance) / n);
    const achievedStatError = 1 / Math.sqrt(r.run_errors.reduce((a, e) => a + 1 / (e * e), 0));
    if (!(predictedError > 0) || !Number.isFinite(achievedStatError)) continue;
    points.push({
      params: r.params, predictedError, achievedError: r.error, achievedStatError, ratio: r.error / predictedError,
      statRatio: achievedStatError / predictedError, n, replicas: r.run_ns.length, tauIntPredicted: tau,
    });
  }
  if (!points.length) return false;
  const geo = (xs: number[]) => Math.exp(xs.reduce((a, x) => a + Math.log(x), 0) / xs.length);
  await sequelize.query(
    `INSERT INTO planner_outcomes (prediction_id, ensemble_id, group_id, observable, target_error, predicted_error, achieved_error, ratio, stat_ratio, points_compared, points)
     VALUES ($1, $2, $3, $4, $5, $6, $7, $8, $9, $10, $11)
     ON CONFLICT (ensemble_id, prediction_id) DO UPDATE SET predicted_error = EXCLUDED.predicted_error, achieved_error = EXCLUDED.achieved_error,
       ratio = EXCLUDED.ratio, stat_ratio = EXCLUDED.stat_ratio, points_compared = EXCLUDED.points_compared, points = EXCLUDED.points, recorded_at = now()`,
    {
      bind: [predictionId, ensemble.id, ensemble.groupId, prediction.observable, prediction.target_error,
        Math.max(...points.map((p) => p.predictedError)), Math.max(...points.map((p) => p.achievedError)),
        geo(points.map((p) => p.ratio)), geo(points.map((p) => p.statRatio)), points.length, JSON.stringify(points)],
      transaction,
    },
  );
  return true;
}

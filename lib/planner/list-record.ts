import "server-only";
// The planner's record: predicted vs achieved errors of ended ensembles that followed a prediction, in the caller's groups.
import type { Identity } from "@/lib/auth/identity";
import { visibleGroupIds } from "@/lib/auth/visible-groups";
import { db } from "@/models";

/** One point of an outcome: what was predicted there and what the ensemble achieved. */
export type OutcomePoint = {
  params: Record<string, unknown>; predictedError: number; achievedError: number; achievedStatError: number; ratio: number; statRatio: number;
  n: number; replicas: number; tauIntPredicted: number;
};

/** One row of the record. */
export type Outcome = {
  id: string; predictionId: string; ensembleId: string; ensembleName: string; sampler: string; observable: string;
  targetError: number; predictedError: number; achievedError: number; ratio: number; statRatio: number; pointsCompared: number;
  predictedCoreHours: number | null; chargedCoreHours: number | null; recordedAt: string; points: OutcomePoint[];
};

/** Outcomes visible to `who`, newest first; `ensembleId` narrows to one ensemble. */
export async function listPlannerRecord(who: Identity, o: { ensembleId?: string; limit?: number } = {}): Promise<Outcome[]> {
  const rows = (await db().sequelize.query(
    `SELECT o.id, o.prediction_id, o.ensemble_id, en.name AS ensemble_name, p.sampler, o.observable, o.target_error, o.predicted_error,
            o.achieved_error, o.ratio, o.stat_ratio, o.points_compared, o.points, o.recorded_at, p.core_hours AS predicted_core_hours,
            (SELECT sum(r.core_hours_used) FROM runs r WHERE r.ensemble_id = o.ensemble_id)::float8 AS charged_core_hours
       FROM planner_outcomes o JOIN planner_predictions p ON p.id = o.prediction_id JOIN ensembles en ON en.id = o.ensemble_id
      WHERE ($1::uuid[] IS NULL OR o.group_id = ANY($1::uuid[])) AND ($2::uuid IS NULL OR o.ensemble_id = $2::uuid)
      ORDER BY o.recorded_at DESC LIMIT $3`,
    { bind: [visibleGroupIds(who), o.ensembleId ?? null, Math.min(o.limit ?? 200, 1000)], type: "SELECT" },
  )) as Record<string, any>[];
  return rows.map((r) => ({
    id: r.id, predictionId: r.prediction_id, ensembleId: r.ensemble_id, ensembleName: r.ensemble_name, sampler: r.sampler, observable: r.observable,
    targetError: r.target_error, predictedError: r.predicted_error, achievedError: r.achieved_error, ratio: r.ratio, statRatio: r.stat_ratio,
    pointsCompared: r.points_compared, predictedCoreHours: r.predicted_core_hours, chargedCoreHours: r.charged_core_hours,
    recordedAt: new Date(r.recorded_at).toISOString(), points: r.points,
  }));
}

import "server-only";
// Store new estimate versions for one run or point: previous current ones flipped, version max+1.
import type { Transaction } from "sequelize";
import { modelsFor } from "@/lib/db/models-for";
import type { Estimate, EstimateAttributes, EstimateScope } from "@/models/estimate";

/** An estimate to store, without the fields this module fills in (scope, target, version, isCurrent). */
export type NewEstimate = Pick<EstimateAttributes, "pointId" | "ensembleId" | "observable" | "mean" | "error" | "n" | "method" | "analysisVersion">
  & Partial<Pick<EstimateAttributes, "tauInt" | "tauIntError" | "thermCut" | "window" | "chi2dof" | "flagged" | "params" | "chosenById" | "chosenAt">>;

/**
 * Insert `estimates` as the current versions for (scope, target): per observable, the previous
 * current row is flipped to isCurrent = false and the new one gets version max + 1. The caller's
 * transaction must hold a lock on the target (run or point row) so versions cannot race.
 */
export async function writeEstimateVersions(
  scope: EstimateScope, targetId: string, estimates: NewEstimate[], transaction: Transaction,
): Promise<Estimate[]> {
  if (estimates.length === 0) return [];
  const m = modelsFor(transaction);
  const observables = estimates.map((e) => e.observable);
  const target = scope === "run" ? "run_id" : "point_id";
  const latest = (await m.sequelize.query(
    `SELECT observable, max(version) AS version FROM estimates WHERE scope = $1 AND ${target} = $2 AND observable = ANY($3) GROUP BY observable`,
    { bind: [scope, targetId, observables], transaction, type: "SELECT" },
  )) as { observable: string; version: number }[];
  const next = new Map(latest.map((r) => [r.observable, Number(r.version) + 1]));
  await m.sequelize.query(
    `UPDATE estimates SET is_current = false WHERE scope = $1 AND ${target} = $2 AND observable = ANY($3) AND is_current`,
    { bind: [scope, targetId, observables], transaction },
  );
  return m.Estimate.bulkCreate(
    estimates.map((e) => ({
      ...e, scope, runId: scope === "run" ? targetId : null, version: next.get(e.observable) ?? 1, isCurrent: true,
    })),
    { transaction, returning: true },
  );
}

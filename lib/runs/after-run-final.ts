import "server-only";
// What follows a run reaching a final state: its point's combined estimates once every replica
// there is final, and its ensemble's state once every run is.
import type { Transaction } from "sequelize";

import { modelsFor } from "@/lib/db/models-for";
import { computePointEstimates } from "@/lib/estimates/compute-point-estimates";
import { enqueueEnsembleDoneMail } from "@/lib/mail/ensemble-done";
import { recordPlanOutcomes } from "@/lib/planner/record-outcome";
import type { EnsembleState } from "@/models/ensemble";
import type { RunState } from "@/models/run";

/** Run states after which nothing happens unless someone acts (a failed run awaiting retry is already queued again). */
export const SETTLED_RUN_STATES: readonly RunState[] = ["done", "failed", "cancelled"];

/**
 * Lock the ensemble row first in every transaction that ends a run: the same order as
 * cancelEnsemble (ensemble, then runs, then ledger and queue rows), so the two cannot deadlock.
 */
export async function lockEnsemble(ensembleId: string, transaction: Transaction): Promise<void> {
  await modelsFor(transaction).Ensemble.findByPk(ensembleId, { transaction, lock: transaction.LOCK.UPDATE, attributes: ["id"] });
}

/** The ensemble state its runs' final states add up to. */
export function ensembleOutcome(current: EnsembleState, counts: Partial<Record<RunState, number>>): EnsembleState {
  if (current === "cancelled") return "cancelled";
  if ((counts.failed ?? 0) > 0) return "failed";
  if ((counts.done ?? 0) > 0) return "done";
  return "cancelled";
}

/**
 * In the caller's transaction: lock the run's ensemble (so that of two runs finishing at once
 * the later one sees the earlier), compute the point's estimates if all its replicas are final
 * and at least one is done, and close the ensemble if all its runs are final.
 */
export async function afterRunFinal(run: { ensembleId: string; pointId: string }, options: { transaction: Transaction }): Promise<{
  pointEstimated: boolean; ensembleState: EnsembleState;
}> {
  const { transaction } = options;
  const { Ensemble, Run } = modelsFor(transaction);
  const ensemble = await Ensemble.findByPk(run.ensembleId, { transaction, lock: transaction.LOCK.UPDATE });
  if (!ensemble) throw new Error(`ensemble ${run.ensembleId} does not exist`);

  const atPoint = await Run.findAll({ where: { pointId: run.pointId }, attributes: ["state"], transaction });
  const pointFinal = atPoint.every((r) => SETTLED_RUN_STATES.includes(r.state as RunState));
  const pointEstimated = pointFinal && atPoint.some((r) => r.state === "done");
  if (pointEstimated) await computePointEstimates(run.pointId, { transaction });

  const rows = (await Run.count({ where: { ensembleId: ensemble.id }, group: ["state"], transaction })) as unknown as { state: RunState; count: number | string }[];
  const counts: Partial<Record<RunState, number>> = Object.fromEntries(rows.map((r) => [r.state, Number(r.count)]));
  const open = Object.entries(counts).some(([state, n]) => !SETTLED_RUN_STATES.includes(state as RunState) && Number(n) > 0);
  if (!open && (ensemble.state === "active" || ensemble.finishedAt === null)) {
    await ensemble.update({ state: ensembleOutcome(ensemble.state as EnsembleState, counts), finishedAt: ensemble.finishedAt ?? new Date() }, { transaction });
    await enqueueEnsembleDoneMail(ensemble.id, { transaction }); // only if the spec asks (notify.onDone)
    await recordPlanOutcomes(ensemble, { transaction }); // only if a spec tag names a planner prediction
  }
  return { pointEstimated, ensembleState: ensemble.state as EnsembleState };
}


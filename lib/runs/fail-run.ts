import "server-only";
// A failed attempt: record why, then either queue the run again (the spec's retry policy) or
// leave it failed for good: settle its core-hours, queue the ensemble's failure digest, and
// see whether its point and ensemble are now complete. All in one transaction.
import type { Transaction } from "sequelize";
import { env } from "@/lib/env";
import { modelsFor } from "@/lib/db/models-for";
import { enqueue } from "@/lib/queue/enqueue";
import { settleRun } from "@/lib/allocations/settle-run";
import { transitionRun } from "./transition-run";
import { retryPolicyOf, shouldRetry } from "./retry-policy";
import { afterRunFinal, lockEnsemble } from "./after-run-final";
import type { FailureReason } from "@/models/run";

/** Why an attempt failed, and what it cost. */
export type AttemptFailure = {
  reason: FailureReason;
  detail: string;
  stderrTail?: string | null;
  exitCode?: number | null;
  startedAt?: Date | null;
  finishedAt?: Date | null;
  /** Core-hours this attempt used (recorded in the event for settlement); leave out if an earlier event has them. */
  coreHours?: number;
};

/** Largest stderr tail kept on the run (the node keeps 4000 characters). */
const STDERR_TAIL_CHARS = 4000;

/** Fail the run's current attempt; returns whether it was queued again. */
export async function failRun(runId: string, failure: AttemptFailure, options: { cause: string; transaction?: Transaction }): Promise<{ retried: boolean; why: string }> {
  const { sequelize, Ensemble, Run } = modelsFor(options.transaction);
  const work = async (transaction: Transaction) => {
    const current = await Run.findByPk(runId, { attributes: ["ensembleId"], transaction });
    if (current) await lockEnsemble(current.ensembleId, transaction);
    // Only what this failure knows is written: a run failing after collection (import_rejected)
    // keeps its exit code, stderr tail and core-hours, whose event already carries them.
    const { run } = await transitionRun(runId, "failed", {
      cause: options.cause, transaction,
      detail: { reason: failure.reason, message: failure.detail, ...(failure.coreHours !== undefined ? { coreHours: failure.coreHours } : {}) },
      patch: {
        failureReason: failure.reason, failureDetail: failure.detail,
        ...(failure.stderrTail !== undefined ? { stderrTail: failure.stderrTail ? failure.stderrTail.slice(-STDERR_TAIL_CHARS) : null } : {}),
        ...(failure.exitCode !== undefined ? { exitCode: failure.exitCode } : {}),
        ...(failure.coreHours !== undefined ? { coreHoursUsed: failure.coreHours } : {}),
        ...(failure.startedAt ? { startedAt: failure.startedAt } : {}),
        ...(failure.finishedAt ? { finishedAt: failure.finishedAt } : {}),
      },
    });
    const ensemble = await Ensemble.findByPk(run.ensembleId, { transaction });
    const spec = (ensemble?.spec ?? {}) as Record<string, unknown>;
    const decision = ensemble?.state === "cancelled"
      ? { retry: false, why: "the ensemble was cancelled" }
      : shouldRetry(retryPolicyOf(spec), failure.reason, run.attempt);
    if (decision.retry) {
      await transitionRun(runId, "queued", { cause: "retry.policy", transaction, detail: { why: decision.why } });
      return { retried: true, why: decision.why };
    }
    await settleRun(runId, { transaction });
    const notify = (spec.notify ?? {}) as { onFailure?: boolean };
    if (notify.onFailure !== false) {
      // One digest per ensemble: the "short" queue keeps a single waiting job per key, so every
      // failure inside the window joins the one already queued.
      await enqueue("failure-digest", { ensembleId: run.ensembleId },
        { transaction, singletonKey: run.ensembleId, startAfter: env.broker.digestSeconds });
    }
    await afterRunFinal(run, { transaction });
    return { retried: false, why: decision.why };
  };
  return options.transaction ? work(options.transaction) : sequelize.transaction(work);
}

// Cancel: the cluster side of cancelling an ensemble. Runs on the cluster are cancelled there
// (one call), then recorded as cancelled with what they used; every cancelled run of the
// ensemble is settled (idempotent) and the ensemble closed when nothing is left open.
import type { Logger } from "pino";
import { Op } from "sequelize";
import { db } from "@/models";
import { AppError } from "@/lib/errors";
import { transitionRun } from "@/lib/runs/transition-run";
import { attemptCoreHours } from "@/lib/runs/attempt-core-hours";
import { settleRun } from "@/lib/allocations/settle-run";
import { afterRunFinal, lockEnsemble } from "@/lib/runs/after-run-final";
import type { ClusterAdapter } from "@/broker/adapters/types";

/** Counts of what a cancel pass did. */
export type CancelOutcome = { cancelledOnCluster: number; settled: number };

/** Cancel the ensemble's runs on `adapter`'s cluster (call under the cluster lock). */
export async function cancelEnsembleRuns(ensembleId: string, adapter: ClusterAdapter | null, log: Logger): Promise<CancelOutcome> {
  const { Run, Ensemble } = db();
  const ensemble = await Ensemble.findByPk(ensembleId);
  if (!ensemble) throw new AppError("not_found", `ensemble ${ensembleId} does not exist`);
  const out: CancelOutcome = { cancelledOnCluster: 0, settled: 0 };
  const onCluster = await Run.findAll({ where: { ensembleId, state: ["dispatched", "running"] } });
  // Runs cancelled while queued may have been submitted by a dispatch in flight: cancel those too.
  const tokened = await Run.findAll({ where: { ensembleId, state: "cancelled", dispatchToken: { [Op.ne]: null } }, attributes: ["id"] });
  const ids = [...onCluster.map((r) => r.id), ...tokened.map((r) => r.id)];
  const statuses = new Map(adapter && ids.length > 0 ? (await adapter.cancel(ids)).map((s) => [s.runId, s]) : []);
  out.cancelledOnCluster = statuses.size;
  for (const run of onCluster) {
    const s = statuses.get(run.id);
    const coreHours = attemptCoreHours(run.cores, s?.startedAt ?? run.startedAt, s?.finishedAt ?? new Date());
    try {
      await db().sequelize.transaction(async (transaction) => {
        await lockEnsemble(ensembleId, transaction);
        await transitionRun(run.id, "cancelled", {
          cause: "broker.cancel", transaction, detail: { coreHours, clusterState: s?.state ?? null },
          patch: { coreHoursUsed: coreHours, ...(s?.startedAt ? { startedAt: new Date(s.startedAt) } : {}) },
        });
        // Settled in the same transaction: nobody sees a cancelled run whose reservation is still held.
        if (!(await settleRun(run.id, { transaction })).alreadySettled) out.settled++;
      });
    } catch (err) {
      if (err instanceof AppError && err.code === "conflict") log.info({ runId: run.id }, "run ended before the cancel reached it");
      else throw err;
    }
  }
  const cancelled = await Run.findAll({ where: { ensembleId, state: "cancelled" } });
  for (const run of cancelled) {
    await db().sequelize.transaction(async (transaction) => {
      await lockEnsemble(ensembleId, transaction);
      const s = await settleRun(run.id, { transaction });
      if (!s.alreadySettled) out.settled++;
    });
  }
  // One call per point that lost runs: a point whose other replicas are done gets its estimates.
  const perPoint = new Map(cancelled.map((r) => [r.pointId, r]));
  for (const run of perPoint.values()) await db().sequelize.transaction((transaction) => afterRunFinal(run, { transaction }));
  return out;
}

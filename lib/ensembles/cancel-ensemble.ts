import "server-only";
// Cancel an ensemble: queued runs end here; runs on the cluster are handed to the broker's "cancel-runs" job.
import { Op } from "sequelize";
import { AppError } from "@/lib/errors";
import { recordAudit, type AuditSource } from "@/lib/audit/record-audit";
import type { Identity } from "@/lib/auth/identity";
import { settleRun } from "@/lib/allocations/settle-run";
import { enqueue } from "@/lib/queue/enqueue";
import { transitionRun } from "@/lib/runs/transition-run";
import { afterRunFinal } from "@/lib/runs/after-run-final";
import { db } from "@/models";
import { lockEnsembleForAct } from "./ensemble-target";

/** What a cancellation did. */
export type Cancelled = { ensembleId: string; cancelled: number; onCluster: number; releasedCoreHours: number; cancelJobQueued: boolean };

/**
 * Cancel every run of an ensemble that has not ended. Queued runs become cancelled at once and
 * their reservations are released (settleRun). Dispatched and running runs are marked by the
 * ensemble's state "cancelled" and a "cancel-runs" {ensembleId} job, whose broker handler calls
 * adapter.cancel for them and moves them to cancelled (settling what they used). Collecting runs
 * have finished computing and are left to be imported; failed runs keep their reason.
 */
export async function cancelEnsemble(audit: AuditSource, who: Identity, ensembleId: string): Promise<Cancelled> {
  const m = db();
  return m.sequelize.transaction(async (transaction) => {
    const ensemble = await lockEnsembleForAct(who, ensembleId, transaction);
    const open = await m.Run.findAll({
      where: { ensembleId, state: { [Op.in]: ["queued", "dispatched", "running"] } }, attributes: ["id", "state", "pointId", "ensembleId", "dispatchToken"], order: [["id", "ASC"]], transaction,
    });
    if (open.length === 0) throw new AppError("conflict", `ensemble "${ensemble.name}" has no queued, dispatched or running runs to cancel`, { ensembleId });
    const queued = open.filter((r) => r.state === "queued");
    let released = 0;
    for (const run of queued) {
      await transitionRun(run.id, "cancelled", { cause: "user.cancel", actorId: who.userId, transaction, patch: { failureReason: "cancelled_by_user" } });
      released += (await settleRun(run.id, { transaction, note: `run ${run.id} cancelled before dispatch` })).released;
    }
    const onCluster = open.length - queued.length;
    await ensemble.update({ state: "cancelled" }, { transaction });
    // Points that lost runs may now be complete (estimates), and the ensemble closes if nothing is open.
    const perPoint = new Map(queued.map((r) => [r.pointId, r]));
    for (const run of perPoint.values()) await afterRunFinal(run, { transaction });
    // A queued run with a dispatch token may be on its way to the cluster: the broker checks for it too.
    const inFlight = queued.some((r) => r.dispatchToken !== null);
    if (onCluster > 0 || inFlight) await enqueue("cancel-runs", { ensembleId }, { transaction });
    await recordAudit(audit, "ensemble.cancel", { type: "ensemble", id: ensembleId, groupId: ensemble.groupId },
      { cancelled: queued.length, onCluster, releasedCoreHours: Math.round(released * 1e4) / 1e4 }, transaction);
    return { ensembleId, cancelled: queued.length, onCluster, releasedCoreHours: Math.round(released * 1e4) / 1e4, cancelJobQueued: onCluster > 0 || inFlight };
  });
}

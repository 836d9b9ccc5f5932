import "server-only";
// Resubmit an ensemble's failed runs: queued again, each with a fresh reservation checked under the allocation lock.
import { AppError } from "@/lib/errors";
import { recordAudit, type AuditSource } from "@/lib/audit/record-audit";
import type { Identity } from "@/lib/auth/identity";
import { enqueue } from "@/lib/queue/enqueue";
import { transitionRun } from "@/lib/runs/transition-run";
import { db } from "@/models";
import { lockEnsembleForAct } from "./ensemble-target";
import { assertFunds, checkFunds } from "./funds";
import { coreHoursPerRun } from "./placement";
import type { EnsembleSpec } from "@/lib/spec";

/** What a resubmission did. */
export type Resubmitted = { ensembleId: string; runIds: string[]; reservedCoreHours: number };

/**
 * Move every failed run of an ensemble back to queued (transitionRun: attempt + 1) after reserving
 * cores × wall time for each again. The failed attempt's reservation was settled when it failed,
 * so the new one is a per-run "reserve" entry (runId set), which settleRun counts at the next settlement.
 */
export async function resubmitFailed(audit: AuditSource, who: Identity, ensembleId: string): Promise<Resubmitted> {
  const m = db();
  return m.sequelize.transaction(async (transaction) => {
    const ensemble = await lockEnsembleForAct(who, ensembleId, transaction);
    if (!ensemble.allocationId) throw new AppError("conflict", `ensemble "${ensemble.name}" holds uploaded runs; there is nothing to resubmit`);
    const failed = await m.Run.findAll({ where: { ensembleId, state: "failed" }, attributes: ["id"], order: [["id", "ASC"]], transaction });
    if (failed.length === 0) throw new AppError("conflict", `ensemble "${ensemble.name}" has no failed runs`, { ensembleId });
    const perRun = coreHoursPerRun(ensemble.spec as unknown as EnsembleSpec);
    const needed = Math.round(perRun * failed.length * 1e4) / 1e4;
    const allocation = (await m.Allocation.findByPk(ensemble.allocationId, { transaction }))!;
    // Charged to the owner's cap: the runs are theirs, whoever presses the button.
    assertFunds(await checkFunds(allocation, ensemble.ownerId, needed, { transaction, lock: true }));
    await m.LedgerEntry.bulkCreate(failed.map((r) => ({
      allocationId: allocation.id, kind: "reserve" as const, coreHours: perRun, ensembleId, runId: r.id, userId: ensemble.ownerId,
      note: `resubmission of failed run ${r.id}`,
    })), { transaction });
    for (const r of failed) await transitionRun(r.id, "queued", { cause: "user.resubmit", actorId: who.userId, transaction });
    await ensemble.update({ state: "active", finishedAt: null, reservedCoreHours: Math.round((ensemble.reservedCoreHours + needed) * 1e4) / 1e4 }, { transaction });
    await recordAudit(audit, "ensemble.resubmit", { type: "ensemble", id: ensembleId, groupId: ensemble.groupId }, { runs: failed.length, reservedCoreHours: needed }, transaction);
    await enqueue("dispatch-runs", { ensembleId }, { transaction });
    return { ensembleId, runIds: failed.map((r) => r.id), reservedCoreHours: needed };
  });
}

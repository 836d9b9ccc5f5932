import "server-only";
// Submit an ensemble: expand the spec and reserve its core-hours in ONE transaction under the allocation's row lock.
import { recordAudit, type AuditSource } from "@/lib/audit/record-audit";
import type { Identity } from "@/lib/auth/identity";
import { db } from "@/models";
import { enqueue } from "@/lib/queue/enqueue";
import { recordRunsCreated } from "@/lib/runs/transition-run";
import { expandSpec, specHash, type EnsembleSpec } from "@/lib/spec";
import { assertFunds, checkFunds } from "./funds";
import { coreHoursPerRun, resolvePlacement } from "./placement";

/** What a successful submission created. */
export type Submitted = { ensembleId: string; runIds: string[]; points: number; reservedCoreHours: number };

// Rows per INSERT: 10,000 runs in one statement would be a 40,000-parameter query.
const BATCH = 1000;

/**
 * Submit a parsed spec as `who`. Inside one transaction: lock the allocation row, refuse an
 * overspend of the balance or of the per-person cap (AppError "insufficient_allocation" with
 * needed/available), create the ensemble, its points and queued runs, one "reserve" ledger entry,
 * the runs' creation events, an audit entry and the "dispatch-runs" job. Nothing is left on failure.
 */
export async function submitEnsemble(audit: AuditSource, who: Identity, spec: EnsembleSpec): Promise<Submitted> {
  const { points, runs } = expandSpec(spec);
  const perRun = coreHoursPerRun(spec);
  const needed = Math.round(perRun * runs.length * 1e4) / 1e4;
  const sweepsTotal = spec.thermalization + spec.measurements * spec.interval;
  const m = db();
  return m.sequelize.transaction(async (transaction) => {
    const { sampler, allocation, cluster } = await resolvePlacement(who, spec, transaction);
    assertFunds(await checkFunds(allocation, who.userId, needed, { transaction, lock: true, clusterId: cluster.id }));

    const ensemble = await m.Ensemble.create({
      name: spec.name.trim(), description: spec.description ?? null, ownerId: who.userId, groupId: allocation.groupId,
      samplerId: sampler.id, allocationId: allocation.id, clusterId: cluster.id, spec: spec as unknown as Record<string, unknown>,
      specHash: specHash(spec), masterSeed: spec.seed, tags: spec.tags, reservedCoreHours: needed,
    }, { transaction });
    const pointRows = await m.ParameterPoint.bulkCreate(
      points.map((p) => ({ ensembleId: ensemble.id, pointIndex: p.index, params: p.params })), { transaction, returning: ["id", "pointIndex"] });
    const pointId = new Map(pointRows.map((p) => [p.pointIndex, p.id]));
    const created: { id: string; state: "queued" }[] = [];
    for (let i = 0; i < runs.length; i += BATCH) {
      const rows = await m.Run.bulkCreate(runs.slice(i, i + BATCH).map((r) => ({
        ensembleId: ensemble.id, pointId: pointId.get(r.pointIndex)!, replica: r.replica, seed: r.seed,
        cores: spec.resources.cores, reservedCoreHours: perRun, sweepsTotal,
      })), { transaction, returning: ["id", "state"] });
      created.push(...rows.map((r) => ({ id: r.id, state: "queued" as const })));
    }
    await m.LedgerEntry.create({
      allocationId: allocation.id, kind: "reserve", coreHours: needed, ensembleId: ensemble.id, userId: who.userId,
      note: `${runs.length} runs × ${spec.resources.cores} cores × ${spec.resources.wallMinutes} min`,
    }, { transaction });
    await recordRunsCreated(created, { cause: "user.submit", actorId: who.userId, detail: { ensembleId: ensemble.id }, transaction });
    await recordAudit(audit, "ensemble.submit", { type: "ensemble", id: ensemble.id, groupId: allocation.groupId }, {
      name: ensemble.name, specHash: ensemble.specHash, points: points.length, runs: runs.length, reservedCoreHours: needed,
      allocationId: allocation.id, clusterId: cluster.id, sampler: spec.sampler,
    }, transaction);
    await enqueue("dispatch-runs", { ensembleId: ensemble.id }, { transaction });
    // a reservation counts as use: the 80 % / 100 % alerts may be due now
    await enqueue("check-allocation", { allocationId: allocation.id }, { transaction });
    return { ensembleId: ensemble.id, runIds: created.map((r) => r.id), points: points.length, reservedCoreHours: needed };
  });
}

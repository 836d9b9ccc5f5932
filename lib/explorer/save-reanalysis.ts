import "server-only";
// Save a re-analysis of one run's observable: a new Estimate version (older ones kept), who chose
// it and when, the point estimates recomputed and an audit entry — all in one transaction.
import { recordAudit, type AuditSource } from "@/lib/audit/record-audit";
import type { Identity } from "@/lib/auth/identity";
import { checkScope } from "@/lib/auth/scope";
import { AppError } from "@/lib/errors";
import { computePointEstimates } from "@/lib/estimates/compute-point-estimates";
import { writeEstimateVersions } from "@/lib/estimates/write-estimates";
import { loadSeries } from "@/lib/importer/load-series";
import { db } from "@/models";
import type { AnalysisChoice } from "./analysis-options";
import { isRunFrozen } from "./is-run-frozen";
import { recompute } from "./run-analysis";

/** What a saved re-analysis returns: the new run estimate and the point estimates it changed. */
export type SavedReanalysis = { estimate: Record<string, unknown>; previousVersion: number | null; pointEstimates: { observable: string; version: number }[] };

/** True for errors that the database's freeze triggers raise (the provenance engineer's contract: message names "frozen"). */
export function isFrozenWriteError(err: unknown): boolean {
  const e = err as { parent?: { message?: string; code?: string }; original?: { message?: string }; message?: string };
  const message = e?.parent?.message ?? e?.original?.message ?? e?.message ?? "";
  return /frozen/i.test(message) && (e?.parent?.code === undefined || /^(P0001|23|55|42501)/.test(e.parent.code));
}

/** Store `choice` as the run's current estimate of the observable; refused (409) beneath a frozen manuscript. */
export async function saveReanalysis(audit: AuditSource, who: Identity, runId: string, choice: AnalysisChoice): Promise<SavedReanalysis> {
  const m = db();
  try {
    return await m.sequelize.transaction(async (transaction) => {
      // Same lock as computeRunEstimates, so two saves cannot pick the same version number.
      await m.sequelize.query(`SELECT 1 FROM runs WHERE id = $1 FOR NO KEY UPDATE`, { bind: [runId], transaction });
      const run = await m.Run.findByPk(runId, { transaction, include: [{ association: "point" }, { association: "ensemble" }] });
      if (!run?.ensemble || !run.point) throw new AppError("not_found", "run not found");
      checkScope(who, { type: "run", id: run.id, groupId: run.ensemble.groupId, ownerId: run.ensemble.ownerId }, "act");
      if (await isRunFrozen(runId, transaction)) {
        throw new AppError("conflict", "this run is part of a frozen manuscript; its estimates can no longer change", { frozen: true });
      }
      const x = await loadSeries(runId, choice.observable, { transaction });
      const est = recompute(x, choice);
      const previous = await m.Estimate.findOne({ where: { scope: "run", runId, observable: choice.observable, isCurrent: true }, transaction });
      const now = new Date();
      const [saved] = await writeEstimateVersions("run", runId, [{
        pointId: run.pointId, ensembleId: run.ensembleId, observable: choice.observable, mean: est.mean, error: est.error, tauInt: est.tauInt,
        tauIntError: est.tauIntError, thermCut: est.cut.index, n: est.n, window: est.window, method: est.method, analysisVersion: est.analysisVersion,
        params: run.point.params, chosenById: who.userId, chosenAt: now,
      }], transaction);
      const points = await computePointEstimates(run.pointId, { transaction });
      await recordAudit(audit, "estimate.reanalyse", { type: "run", id: runId, groupId: run.ensemble.groupId }, {
        observable: choice.observable, choice, estimateId: saved.id, version: saved.version, previousVersion: previous?.version ?? null,
        mean: saved.mean, error: saved.error, thermCut: saved.thermCut, window: saved.window, method: saved.method,
      }, transaction);
      return {
        estimate: saved.get({ plain: true }) as Record<string, unknown>,
        previousVersion: previous?.version ?? null,
        pointEstimates: points.estimates.map((e) => ({ observable: e.observable, version: e.version })),
      };
    });
  } catch (err) {
    if (err instanceof AppError) throw err;
    if (isFrozenWriteError(err)) throw new AppError("conflict", "this run is part of a frozen manuscript; the database refused to change its estimates", { frozen: true });
    throw err;
  }
}

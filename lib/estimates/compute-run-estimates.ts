import "server-only";
// Per-run estimates: every observable of a run through the analysis library, stored as new versions.
import type { Transaction } from "sequelize";
import { AnalysisError, estimateSeries } from "@/lib/analysis";
import { modelsFor } from "@/lib/db/models-for";
import { AppError } from "@/lib/errors";
import { loadSeries, seriesNames } from "@/lib/importer/load-series";
import type { Estimate } from "@/models/estimate";
import { derivedIsingEstimates, type PrimaryFit } from "./derived-ising";
import { writeEstimateVersions, type NewEstimate } from "./write-estimates";

/** An observable that got no estimate, and why (e.g. a series too short for the automatic cut). */
export type EstimateProblem = { observable: string; reason: string };

/** What {@link computeRunEstimates} stored. */
export type RunEstimatesResult = { estimates: Estimate[]; problems: EstimateProblem[] };

/** Options of {@link computeRunEstimates}. */
export type RunEstimatesOptions = {
  transaction?: Transaction;
  /** The run's series by observable, when the caller has them in memory (the importer); else read from the database. */
  series?: ReadonlyMap<string, Float64Array>;
};

/**
 * Estimate every observable of run `runId` with estimateSeries (MSER-5 cut, Gamma method) and,
 * for ising2d, the derived U4, chi and C (blocked jackknife); store them as the run's current
 * estimates (previous ones kept as older versions), params copied from the run's point.
 */
export async function computeRunEstimates(runId: string, options: RunEstimatesOptions = {}): Promise<RunEstimatesResult> {
  if (!options.transaction) return modelsFor().sequelize.transaction((transaction) => computeRunEstimates(runId, { ...options, transaction }));
  const transaction = options.transaction;
  const m = modelsFor(transaction);
  // Locks the run so two computations cannot pick the same version numbers (NO KEY UPDATE still
  // lets other transactions insert rows that reference the run).
  await m.sequelize.query(`SELECT 1 FROM runs WHERE id = $1 FOR NO KEY UPDATE`, { bind: [runId], transaction });
  const run = await m.Run.findByPk(runId, {
    transaction,
    include: [{ model: m.ParameterPoint, as: "point" }, { model: m.Ensemble, as: "ensemble", include: [{ model: m.Sampler, as: "sampler" }] }],
  });
  if (!run) throw new AppError("not_found", `run ${runId} does not exist`);
  const params = run.point!.params;
  const series = options.series ?? (await readAll(runId, transaction));

  const rows: NewEstimate[] = [];
  const problems: EstimateProblem[] = [];
  const base = { pointId: run.pointId, ensembleId: run.ensembleId, params };
  const fits = new Map<string, PrimaryFit>();
  for (const [observable, x] of series) {
    if (observable === "sweep") continue;
    try {
      const e = estimateSeries(x);
      fits.set(observable, { cut: e.cut.index, tauInt: e.tauInt });
      rows.push({
        ...base, observable, mean: e.mean, error: e.error, tauInt: e.tauInt, tauIntError: e.tauIntError,
        thermCut: e.cut.index, n: e.n, window: e.window, method: e.method, analysisVersion: e.analysisVersion,
      });
    } catch (err) {
      if (!(err instanceof AnalysisError)) throw err;
      problems.push({ observable, reason: err.message });
    }
  }
  if (run.ensemble?.sampler?.name === "ising2d") {
    for (const d of derivedIsingEstimates(series, params, fits)) {
      if ("problem" in d) { problems.push({ observable: d.observable, reason: d.problem }); continue; }
      const r = d.result;
      // tau_int is the largest among the inputs (it set the bin size); the jackknife has no window.
      rows.push({
        ...base, observable: d.observable, mean: r.mean, error: r.error, tauInt: r.tauIntMax, tauIntError: null,
        thermCut: r.cut.index, n: r.n, window: null, method: r.method, analysisVersion: r.analysisVersion,
      });
    }
  }
  const estimates = await writeEstimateVersions("run", runId, rows, transaction);
  return { estimates, problems };
}

async function readAll(runId: string, transaction: Transaction): Promise<Map<string, Float64Array>> {
  const out = new Map<string, Float64Array>();
  for (const name of await seriesNames(runId, { transaction })) {
    if (name !== "sweep") out.set(name, await loadSeries(runId, name, { transaction }));
  }
  return out;
}

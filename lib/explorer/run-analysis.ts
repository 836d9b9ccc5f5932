import "server-only";
// A run's analysis view: series (decimated for plotting), cut, normalised ACF with the window,
// tau_int, blocking curve and the estimate recomputed with the chosen cut/window — nothing saved.
import { AnalysisError, blockingAnalysis, estimateSeries, type Estimate } from "@/lib/analysis";
import { AppError } from "@/lib/errors";
import { loadSeries } from "@/lib/importer/load-series";
import { db } from "@/models";
import type { AnalysisChoice } from "./analysis-options";

/** Most series points sent to a plot; longer series are thinned by a stride. */
export const MAX_PLOT_POINTS = 2_000;

/** Thin `x` to at most `max` points: every stride-th point plus the last, with its index. */
export function decimate(x: Float64Array, sweeps: Float64Array | null, max = MAX_PLOT_POINTS) {
  const stride = Math.max(1, Math.ceil(x.length / max));
  const points: { i: number; sweep: number | null; value: number }[] = [];
  for (let i = 0; i < x.length; i += stride) points.push({ i, sweep: sweeps ? sweeps[i] : null, value: x[i] });
  return { total: x.length, shown: points.length, stride, method: stride === 1 ? "none" : "stride (every k-th measurement)", points };
}

/** An estimate's numbers without the long arrays (those are returned once, at the top level). */
export function estimateSummary(e: Estimate) {
  return {
    mean: e.mean, error: e.error, errorOfError: e.errorOfError, tauInt: e.tauInt, tauIntError: e.tauIntError, window: e.window,
    windowConverged: e.windowConverged, windowParameter: e.windowParameter, method: e.method, n: e.n, nTotal: e.nTotal, cut: e.cut,
    analysisVersion: e.analysisVersion, warnings: e.warnings,
  };
}

/** Recompute `choice` on run `runId`'s series; AnalysisError (too short, cut too large…) becomes a 422 naming the option. */
export function recompute(x: Float64Array, choice: AnalysisChoice): Estimate {
  try {
    return estimateSeries(x, { cut: choice.cut, window: choice.window, S: choice.S, c: choice.c });
  } catch (err) {
    if (err instanceof AnalysisError) throw new AppError("invalid", `analysis of "${choice.observable}": ${err.message}`, { issues: [{ path: choice.cut !== undefined ? "cut" : "observable", message: err.message }] });
    throw err;
  }
}

/** Everything the run analysis view plots, for one observable of one run. */
export async function runAnalysis(runId: string, choice: AnalysisChoice) {
  const x = await loadSeries(runId, choice.observable);
  let sweeps: Float64Array | null = null;
  try { sweeps = await loadSeries(runId, "sweep"); } catch (err) { if (!(err instanceof AppError)) throw err; }
  const est = recompute(x, choice);
  const after = x.subarray(est.cut.index);
  let blocking: ReturnType<typeof blockingAnalysis> | null = null;
  let blockingProblem: string | null = null;
  try { blocking = blockingAnalysis(after); } catch (err) { if (!(err instanceof AnalysisError)) throw err; blockingProblem = err.message; }
  const stored = await db().Estimate.findAll({ where: { scope: "run", runId, observable: choice.observable }, order: [["version", "ASC"]] });
  return {
    runId, observable: choice.observable, choice,
    series: decimate(x, sweeps),
    cut: est.cut,
    acf: { lags: est.acf.length, rho: est.acf, tauIntByWindow: est.tauIntByWindow, window: est.window, method: est.method, parameter: est.windowParameter },
    tauInt: est.tauInt, tauIntError: est.tauIntError,
    blocking: blocking ? { levels: blocking.levels, plateau: blocking.plateau, plateauFound: blocking.plateauFound, rule: blocking.rule, mean: blocking.mean, warnings: blocking.warnings } : null,
    blockingProblem,
    estimate: { ...estimateSummary(est), saved: false },
    versions: stored.map((e) => ({
      id: e.id, version: e.version, isCurrent: e.isCurrent, mean: e.mean, error: e.error, tauInt: e.tauInt, thermCut: e.thermCut, window: e.window,
      method: e.method, analysisVersion: e.analysisVersion, chosenById: e.chosenById, chosenAt: e.chosenAt, createdAt: e.createdAt,
    })),
  };
}

import { assertSeries } from "./errors";
import { gammaMethod, MIN_GAMMA_POINTS, type GammaOptions } from "./gamma";
import { mserCut, MIN_MSER_POINTS, userCut } from "./mser";
import type { Estimate, ThermalisationCut } from "./types";
import { ANALYSIS_VERSION } from "./version";

/** Options of {@link estimateSeries}: the cut (automatic unless given) plus the Gamma options. */
export interface EstimateOptions extends GammaOptions {
  /** Points to discard at the start; omit for the automatic MSER-5 cut. */
  cut?: number;
}

/**
 * The estimate of one observable of one run: thermalisation cut (MSER-5 unless `cut` is given),
 * then the Gamma method on the rest. Input: finite series (≥ 20 points for the automatic cut).
 * Output records the cut, both lengths and ANALYSIS_VERSION.
 */
export function estimateSeries(x: Float64Array, options: EstimateOptions = {}): Estimate {
  const { cut: cutIndex, ...gammaOptions } = options;
  assertSeries(x, "estimateSeries(x)", cutIndex === undefined ? MIN_MSER_POINTS : MIN_GAMMA_POINTS);
  const cut = resolveCut(x, cutIndex, MIN_GAMMA_POINTS);
  const result = gammaMethod(x.subarray(cut.index), gammaOptions);
  return { analysisVersion: ANALYSIS_VERSION, ...result, cut, nTotal: x.length };
}

/** Resolves the cut for a series: MSER-5 when `index` is undefined, otherwise the validated override. */
export function resolveCut(x: Float64Array, index: number | undefined, keep: number): ThermalisationCut {
  return index === undefined ? { index: mserCut(x).index, rule: "mser-5" } : userCut(index, x.length, keep);
}

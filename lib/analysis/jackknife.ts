import { AnalysisError, assertOption, assertSeries } from "./errors";
import { resolveCut } from "./estimate";
import { gammaMethod, MIN_GAMMA_POINTS } from "./gamma";
import { MIN_MSER_POINTS } from "./mser";
import type { ThermalisationCut } from "./types";
import { ANALYSIS_VERSION } from "./version";

/** Bins are this many τ_int long by default: the binned error then misses ≈ 1/(2·20) of itself. */
export const BIN_TAU_FACTOR = 20;
/** Fewest jackknife bins; with fewer the error-of-error (≈ 1/sqrt(2(B−1))) exceeds 16%. */
export const MIN_BINS = 20;

/** Options of {@link jackknife} and the ready-made derived quantities. */
export interface JackknifeOptions {
  /** Points to discard at the start of every series; default: the largest MSER-5 cut among them. */
  cut?: number;
  /** Bin length in points; default ceil(20·max τ_int) of the series, capped to keep ≥ 20 bins. */
  binSize?: number;
}

/** A derived quantity f(⟨A⟩, ⟨B⟩, …) with its blocked-jackknife error. */
export interface DerivedEstimate {
  analysisVersion: string;
  method: "jackknife-blocked";
  /** f evaluated at the means of the binned data. */
  mean: number;
  /** Jackknife bias-corrected value B·f − (B−1)·mean of the leave-one-out values (Quenouille 1956). */
  biasCorrected: number;
  /** Jackknife standard error sqrt((B−1)/B · Σ (f_i − f̄)²) (Tukey 1958). */
  error: number;
  /** Gaussian estimate of the error's own error, error/sqrt(2(B−1)). */
  errorOfError: number;
  binSize: number;
  nBins: number;
  /** Points used: nBins·binSize after the cut (a remainder shorter than a bin is dropped at the end). */
  n: number;
  nTotal: number;
  cut: ThermalisationCut;
  /** Largest Gamma-method τ_int among the inputs; it sets the default bin size. */
  tauIntMax: number;
  warnings: string[];
}

/**
 * Blocked jackknife of a function of the means of several primary series measured together
 * (equal lengths, same sweeps). `f` receives the means in the order of `series` and must return
 * a finite number. Bins of ≥ 20 τ_int keep the autocorrelation out of the error.
 */
export function jackknife(
  series: readonly Float64Array[],
  f: (means: Float64Array) => number,
  options: JackknifeOptions = {},
): DerivedEstimate {
  if (!Array.isArray(series) || series.length === 0) {
    throw new AnalysisError("EMPTY_SERIES", "jackknife(series): expected a non-empty array of Float64Array series");
  }
  if (typeof f !== "function") throw new AnalysisError("INVALID_OPTION", "jackknife(f): expected a function of the means");
  const minLength = options.cut === undefined ? MIN_MSER_POINTS : 2;
  series.forEach((s, k) => assertSeries(s, `jackknife(series[${k}])`, minLength));
  const nTotal = series[0].length;
  series.forEach((s, k) => {
    if (s.length !== nTotal) {
      throw new AnalysisError("LENGTH_MISMATCH", `jackknife(series[${k}]): has ${s.length} points, series[0] has ${nTotal}`);
    }
  });

  const cut = pickCut(series, options.cut);
  const rest = series.map((s) => s.subarray(cut.index));
  const available = nTotal - cut.index;
  const warnings: string[] = [];
  if (available < MIN_GAMMA_POINTS) warnings.push(`only ${available} points after the cut: τ_int cannot be estimated and is taken as 1/2`);
  const tauIntMax = Math.max(...rest.map((s) => (s.length >= MIN_GAMMA_POINTS ? gammaMethod(s).tauInt : 0.5)));

  let binSize: number;
  if (options.binSize !== undefined) {
    assertOption(options.binSize, "jackknife(binSize)", `an integer in [1, ${Math.floor(available / 2)}]`, (v) => Number.isInteger(v) && v >= 1 && v <= available / 2);
    binSize = options.binSize;
  } else {
    binSize = Math.max(1, Math.ceil(BIN_TAU_FACTOR * tauIntMax));
    const cap = Math.floor(available / MIN_BINS);
    if (binSize > cap) {
      warnings.push(`bins of ${binSize} points (20 τ_int) would leave fewer than ${MIN_BINS} bins; using ${Math.max(1, cap)}, so the error may be underestimated`);
      binSize = Math.max(1, cap);
    }
  }
  const nBins = Math.floor(available / binSize);
  if (nBins < 2) throw new AnalysisError("TOO_SHORT", `jackknife: ${available} points after the cut give fewer than 2 bins of ${binSize}`);
  const n = nBins * binSize;

  // Per-series bin sums; leave-one-out means are (total − bin)/(n − binSize).
  const k = rest.length;
  const binSums = rest.map((s) => {
    const sums = new Float64Array(nBins);
    for (let b = 0; b < nBins; b++) {
      let acc = 0;
      for (let i = b * binSize; i < (b + 1) * binSize; i++) acc += s[i];
      sums[b] = acc;
    }
    return sums;
  });
  const totals = binSums.map((sums) => sums.reduce((a, v) => a + v, 0));
  const means = new Float64Array(k);
  for (let a = 0; a < k; a++) means[a] = totals[a] / n;
  const full = evaluate(f, means, "all data");

  const leaveOut = new Float64Array(nBins);
  let avg = 0;
  for (let b = 0; b < nBins; b++) {
    for (let a = 0; a < k; a++) means[a] = (totals[a] - binSums[a][b]) / (n - binSize);
    leaveOut[b] = evaluate(f, means, `all but bin ${b}`);
    avg += leaveOut[b];
  }
  avg /= nBins;
  let ss = 0;
  for (let b = 0; b < nBins; b++) ss += (leaveOut[b] - avg) ** 2;
  const error = Math.sqrt(((nBins - 1) / nBins) * ss);
  if (nBins < MIN_BINS && options.binSize !== undefined) warnings.push(`only ${nBins} bins: the jackknife error is itself uncertain by ≈ ${(100 / Math.sqrt(2 * (nBins - 1))).toFixed(0)}%`);

  return {
    analysisVersion: ANALYSIS_VERSION,
    method: "jackknife-blocked",
    mean: full,
    biasCorrected: nBins * full - (nBins - 1) * avg,
    error,
    errorOfError: error / Math.sqrt(2 * (nBins - 1)),
    binSize,
    nBins,
    n,
    nTotal,
    cut,
    tauIntMax,
    warnings,
  };
}

// Series measured together share one cut; the most conservative MSER cut serves all of them.
function pickCut(series: readonly Float64Array[], index: number | undefined): ThermalisationCut {
  if (index !== undefined) return resolveCut(series[0], index, 2);
  return series.map((s) => resolveCut(s, undefined, 2)).reduce((a, b) => (b.index > a.index ? b : a));
}

function evaluate(f: (m: Float64Array) => number, means: Float64Array, where: string): number {
  const v = f(means);
  if (typeof v !== "number" || !Number.isFinite(v)) {
    throw new AnalysisError("FUNCTION_NOT_FINITE", `jackknife: derived function returned ${String(v)} on ${where} (means ${Array.from(means).join(", ")})`);
  }
  return v;
}

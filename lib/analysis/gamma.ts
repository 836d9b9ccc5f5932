import { autocovariance } from "./autocovariance";
import { AnalysisError, assertOption, assertSeries } from "./errors";
import type { GammaResult, WindowMethod } from "./types";

/** Fewest points the Gamma method accepts; below this no window can be judged. */
export const MIN_GAMMA_POINTS = 10;

/** Options of {@link gammaMethod}; every field has a documented default. */
export interface GammaOptions {
  /** "wolff" (default): automatic windowing of Wolff 2004; "madras-sokal": smallest W ≥ c·τ_int(W). */
  window?: "wolff" | "madras-sokal";
  /** Wolff's S, the assumed ratio τ_exp/τ_int; default 1.5 (Wolff 2004's recommendation). */
  S?: number;
  /** Madras–Sokal factor c; default 6 (common practice; Madras & Sokal 1988 discuss 4–10). */
  c?: number;
  /** Lags of the normalised ACF to return; default min(⌊n/2⌋, max(4W, 32), 4096). */
  acfLags?: number;
}

/**
 * Mean, error, τ_int and its error of a series by the Gamma method (Wolff 2004).
 *
 * Input: a finite series of at least {@link MIN_GAMMA_POINTS} points, already cut for
 * thermalisation. Γ(t) comes from an FFT (zero-padded to a power of two ≥ 2n). The window W is
 * chosen on the raw Γ; then Γ(t) += C_F/n (Wolff's correction of the bias from subtracting the
 * estimated mean) and error, τ_int and the ACF are computed from the corrected Γ.
 */
export function gammaMethod(x: Float64Array, options: GammaOptions = {}): GammaResult {
  assertSeries(x, "gammaMethod(x)", MIN_GAMMA_POINTS);
  const rule = options.window ?? "wolff";
  if (rule !== "wolff" && rule !== "madras-sokal") {
    throw new AnalysisError("INVALID_OPTION", `gammaMethod(window): must be "wolff" or "madras-sokal", got ${String(rule)}`);
  }
  const method: WindowMethod = rule === "wolff" ? "gamma-wolff" : "gamma-madras-sokal";
  const param = rule === "wolff" ? options.S ?? 1.5 : options.c ?? 6;
  assertOption(param, rule === "wolff" ? "gammaMethod(S)" : "gammaMethod(c)", "a finite number > 0", (v) => v > 0);
  if (options.acfLags !== undefined) {
    assertOption(options.acfLags, "gammaMethod(acfLags)", "an integer ≥ 1", (v) => Number.isInteger(v) && v >= 1);
  }

  const n = x.length;
  if (isConstant(x)) return constantResult(x[0], n, method, param);

  const wMax = Math.floor(n / 2);
  const gamma = autocovariance(x, wMax);
  const found = rule === "wolff" ? wolffWindow(gamma, n, param) : madrasSokalWindow(gamma, param);
  const W = found ?? wMax;

  let cF = gamma[0];
  for (let t = 1; t <= W; t++) cF += 2 * gamma[t];
  // Wolff 2004: the estimated mean makes every Γ(t) low by about C_F/n; add it back.
  const shift = cF / n;
  const g0 = gamma[0] + shift;
  const cFc = cF + (2 * W + 1) * shift;

  const warnings: string[] = [];
  if (found === undefined) warnings.push(`windowing rule did not fire up to W = ${wMax} (n/2); series too short for its autocorrelation`);
  if (cFc <= 0) {
    throw new AnalysisError("DEGENERATE", `gammaMethod(x): summed autocovariance is ${cFc} ≤ 0 at W = ${W}; the series is anticorrelated beyond what the method can handle`);
  }
  const tauInt = cFc / (2 * g0);
  const error = Math.sqrt(cFc / n);
  if (n < 100 * tauInt) warnings.push(`n = ${n} is less than 100 τ_int (${tauInt.toPrecision(3)}): error estimates are unreliable (common practice)`);

  const lags = Math.min(wMax, options.acfLags ?? Math.min(Math.max(4 * W, 32), 4096));
  const acf: number[] = new Array(lags + 1);
  const tauIntByWindow: number[] = new Array(lags + 1);
  let cumulative = 0.5;
  for (let t = 0; t <= lags; t++) {
    acf[t] = (gamma[t] + shift) / g0;
    if (t > 0) cumulative += acf[t];
    tauIntByWindow[t] = cumulative;
  }

  return {
    method,
    mean: mean(x),
    error,
    errorOfError: error * Math.sqrt((W + 0.5) / n),
    tauInt,
    tauIntError: 2 * tauInt * Math.sqrt(Math.max(0, W + 0.5 - tauInt) / n),
    window: W,
    windowConverged: found !== undefined,
    windowParameter: param,
    n,
    acf,
    tauIntByWindow,
    warnings,
  };
}

/**
 * Wolff 2004 automatic window: with τ(W) = S / ln((2τ_int(W)+1)/(2τ_int(W)−1)) — the exponential
 * decay time that would give τ_int(W) — W is the first lag where
 * g(W) = exp(−W/τ) − τ/sqrt(W n) turns negative (truncation bias ≈ statistical error).
 */
function wolffWindow(gamma: Float64Array, n: number, S: number): number | undefined {
  let tauW = 0.5;
  for (let W = 1; W < gamma.length; W++) {
    tauW += gamma[W] / gamma[0];
    if (tauW <= 0.5) return W; // ρ already summed to ≤ 0: no correlation left to resolve
    const tau = S / Math.log((2 * tauW + 1) / (2 * tauW - 1));
    const g = Math.exp(-W / tau) - tau / Math.sqrt(W * n);
    if (g < 0) return W;
  }
  return undefined;
}

/** Madras & Sokal 1988 self-consistent window: smallest W with W ≥ c·τ_int(W). */
function madrasSokalWindow(gamma: Float64Array, c: number): number | undefined {
  let tauW = 0.5;
  for (let W = 1; W < gamma.length; W++) {
    tauW += gamma[W] / gamma[0];
    if (W >= c * tauW) return W;
  }
  return undefined;
}

function mean(x: Float64Array): number {
  let s = 0;
  for (let i = 0; i < x.length; i++) s += x[i];
  return s / x.length;
}

function isConstant(x: Float64Array): boolean {
  for (let i = 1; i < x.length; i++) if (x[i] !== x[0]) return false;
  return true;
}

// A constant series (e.g. acceptance stuck at 1) has a well-defined mean and no fluctuation to
// estimate from; report a zero error loudly instead of dividing by Γ(0) = 0.
function constantResult(value: number, n: number, method: WindowMethod, param: number): GammaResult {
  return {
    method, mean: value, error: 0, errorOfError: 0, tauInt: 0.5, tauIntError: 0, window: 0,
    windowConverged: true, windowParameter: param, n, acf: [1], tauIntByWindow: [0.5],
    warnings: ["series is constant: error is zero and tau_int is set to 1/2"],
  };
}

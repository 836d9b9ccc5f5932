import { AnalysisError, assertOption } from "./errors";
import { prepareSpectrum, type SpectrumOptions } from "./spectrum";
import { ANALYSIS_VERSION } from "./version";

/** Options of {@link weylFit}. */
export interface WeylOptions extends SpectrumOptions {
  /** λ window [lo, hi] to fit; default: the low end of the spectrum, see {@link weylFit}. */
  window?: [number, number];
}

/** Effective dimension from Weyl's law N(λ) ∝ λ^{d/2}. */
export interface WeylFit {
  analysisVersion: string;
  /** d = 2 × fitted exponent of N(λ). */
  dimension: number;
  /** 2 × max(least-squares slope error, half the slope difference between the window's halves). */
  dimensionError: number;
  /** ln A of N(λ) ≈ A λ^{d/2}. */
  logPrefactor: number;
  /** λ range actually fitted. */
  window: [number, number];
  /** Distinct eigenvalues in the fit. */
  points: number;
  zeroModes: number;
}

/** Default window, as fractions of the number of eigenvalues N: counts from 1e-4·N to 1e-3·N. */
export const WEYL_DEFAULT_COUNTS = { lo: 1e-4, hi: 1e-3, minLo: 5, minHi: 50 } as const;

/**
 * Log-log least-squares fit of Weyl's law N(λ) = A λ^{d/2} over a λ window.
 *
 * Each distinct positive eigenvalue contributes one point (ln λ, ln N_mid), N_mid the midpoint of
 * the staircase's jump there (counts below plus half the multiplicity): the top or bottom of the
 * steps would bias the slope on degenerate spectra. Zero modes are a constant and are left out
 * of N. Default window: nonzero counts between max(5, 1e-4 N) and max(50, 1e-3 N) — the low end
 * of the spectrum, where a lattice Laplacian is closest to the continuum (lattice corrections grow
 * like λ/12), skipping the first coarse shells. Error: neighbouring staircase points are
 * correlated, so the least-squares error alone is too small; it is replaced by half the exponent
 * difference between fits to the window's lower and upper halves (geometric split) when larger.
 */
export function weylFit(eigenvalues: Float64Array, options: WeylOptions = {}): WeylFit {
  const spec = prepareSpectrum(eigenvalues, "weylFit(eigenvalues)", options);
  const xs: number[] = [];
  const ys: number[] = [];
  let below = 0; // nonzero eigenvalues strictly below the current one
  const w = options.window;
  if (w !== undefined) {
    if (!Array.isArray(w) || w.length !== 2) throw new AnalysisError("INVALID_OPTION", "weylFit(window): expected [lo, hi]");
    assertOption(w[0], "weylFit(window[0])", "a finite number > 0", (v) => v > 0);
    assertOption(w[1], "weylFit(window[1])", `a finite number > window[0] = ${w[0]}`, (v) => v > w[0]);
  }
  const nonzero = spec.size - spec.zeroModes;
  const countLo = Math.max(WEYL_DEFAULT_COUNTS.minLo, WEYL_DEFAULT_COUNTS.lo * spec.size);
  const countHi = Math.max(WEYL_DEFAULT_COUNTS.minHi, WEYL_DEFAULT_COUNTS.hi * spec.size);
  let used: [number, number] = [Infinity, -Infinity];
  for (let j = 0; j < spec.values.length; j++) {
    const lambda = spec.values[j];
    if (lambda === 0) continue;
    const mid = below + spec.multiplicity[j] / 2;
    below += spec.multiplicity[j];
    const inside = w ? lambda >= w[0] && lambda <= w[1] : mid >= countLo && mid <= countHi;
    if (!inside) continue;
    xs.push(Math.log(lambda));
    ys.push(Math.log(mid));
    used = [Math.min(used[0], lambda), Math.max(used[1], lambda)];
  }
  if (xs.length < 3) {
    throw new AnalysisError(
      "DEGENERATE",
      `weylFit: only ${xs.length} distinct positive eigenvalue(s) in the window (of ${nonzero} nonzero); give a wider window`,
    );
  }
  const all = leastSquares(xs, ys);
  // Drift between the lower and upper half of the window (geometric split) exposes curvature
  // and staircase effects that the point-to-point scatter hides.
  const split = 0.5 * (xs[0] + xs[xs.length - 1]);
  const lower = xs.findIndex((x) => x > split);
  const halves = lower >= 3 && xs.length - lower >= 3
    ? [leastSquares(xs.slice(0, lower), ys.slice(0, lower)), leastSquares(xs.slice(lower), ys.slice(lower))]
    : undefined;
  const drift = halves ? Math.abs(halves[0].slope - halves[1].slope) / 2 : 0;
  return {
    analysisVersion: ANALYSIS_VERSION,
    dimension: 2 * all.slope,
    dimensionError: 2 * Math.max(all.slopeError, drift),
    logPrefactor: all.intercept,
    window: used,
    points: xs.length,
    zeroModes: spec.zeroModes,
  };
}

function leastSquares(xs: number[], ys: number[]): { slope: number; slopeError: number; intercept: number } {
  const m = xs.length;
  const mx = xs.reduce((a, b) => a + b, 0) / m;
  const my = ys.reduce((a, b) => a + b, 0) / m;
  let sxx = 0;
  let sxy = 0;
  for (let k = 0; k < m; k++) {
    sxx += (xs[k] - mx) ** 2;
    sxy += (xs[k] - mx) * (ys[k] - my);
  }
  if (sxx === 0) throw new AnalysisError("DEGENERATE", "weylFit: all eigenvalues in the window are equal");
  const slope = sxy / sxx;
  let ss = 0;
  for (let k = 0; k < m; k++) ss += (ys[k] - my - slope * (xs[k] - mx)) ** 2;
  return { slope, slopeError: Math.sqrt(ss / Math.max(1, m - 2) / sxx), intercept: my - slope * mx };
}

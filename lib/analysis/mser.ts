import { AnalysisError, assertSeries } from "./errors";
import type { ThermalisationCut } from "./types";

/** MSER-5 averages batches of this many points before searching for the cut (White 1997). */
export const MSER_BATCH = 5;
/** Fewest points MSER-5 accepts: four batches, so that a cut of up to half of them is defined. */
export const MIN_MSER_POINTS = 4 * MSER_BATCH;

/** The MSER-5 cut with the statistic it minimised. */
export interface MserResult extends ThermalisationCut {
  rule: "mser-5";
  /** Number of batches cut (index = MSER_BATCH · batchesCut). */
  batchesCut: number;
  /** MSER(d) for each candidate batch cut d = 0..⌊m/2⌋, for plotting the choice. */
  statistic: number[];
}

/**
 * Marginal Standard Error Rule, MSER-5 (White 1997): average the series in batches of 5, then
 * choose the cut d (in batches) that minimises MSER(d) = Σ_{j≥d} (z_j − z̄_d)² / (m − d)² over
 * the first half of the m batches (the usual restriction, so the rule cannot discard most data).
 *
 * Input: finite series of at least {@link MIN_MSER_POINTS} points. Output: cut index in points.
 */
export function mserCut(x: Float64Array): MserResult {
  assertSeries(x, "mserCut(x)", MIN_MSER_POINTS);
  const m = Math.floor(x.length / MSER_BATCH);
  const z = new Float64Array(m);
  let grand = 0;
  for (let j = 0; j < m; j++) {
    let s = 0;
    for (let i = 0; i < MSER_BATCH; i++) s += x[j * MSER_BATCH + i];
    z[j] = s / MSER_BATCH;
    grand += z[j];
  }
  grand /= m;
  // Suffix sums of centred values keep Σ(z−z̄)² = Σz² − (Σz)²/k well conditioned.
  const dMax = Math.floor(m / 2);
  const statistic: number[] = new Array(dMax + 1);
  let s1 = 0;
  let s2 = 0;
  for (let j = m - 1; j >= 0; j--) {
    const c = z[j] - grand;
    s1 += c;
    s2 += c * c;
    if (j <= dMax) {
      const k = m - j;
      statistic[j] = Math.max(0, s2 - (s1 * s1) / k) / (k * k);
    }
  }
  let best = 0;
  for (let d = 1; d <= dMax; d++) if (statistic[d] < statistic[best]) best = d;
  return { index: best * MSER_BATCH, rule: "mser-5", batchesCut: best, statistic };
}

/** Validates a user-given cut for a series of length n, leaving at least `keep` points. */
export function userCut(index: unknown, n: number, keep: number): ThermalisationCut {
  if (typeof index !== "number" || !Number.isInteger(index) || index < 0 || index > n - keep) {
    throw new AnalysisError(
      "INVALID_OPTION",
      `cut: must be an integer in [0, ${Math.max(0, n - keep)}] for a series of ${n} points (at least ${keep} must remain), got ${String(index)}`,
    );
  }
  return { index, rule: "user" };
}

import { describe, expect, it } from "vitest";
import { mserCut } from "@/lib/analysis/mser";
import { estimateSeries } from "@/lib/analysis/estimate";
import { ar1, ar1MeanError } from "./support";

describe("MSER-5 thermalisation cut (White 1997)", () => {
  const A = 20; // planted offset, ≈ 9 σ_x of the AR(1) below
  const T0 = 200; // its decay time in sweeps
  const n = 20_000;
  const phi = 0.9;

  for (const seed of [61, 62, 63, 64, 65]) {
    it(`finds a planted transient A·exp(−t/${T0}) (seed ${seed}) in a sensible range`, () => {
      const x = ar1(n, phi, seed);
      for (let t = 0; t < n; t++) x[t] += A * Math.exp(-t / T0);
      const { index } = mserCut(x);
      // Sensible = the offset left after the cut biases the mean by less than its exact standard
      // error (sum of the remaining exponential tail over n − cut points) …
      const residualBias = (A * Math.exp(-index / T0)) / (1 - Math.exp(-1 / T0)) / (n - index);
      expect(residualBias).toBeLessThan(ar1MeanError(phi, n - index));
      // … without discarding far more than the transient: at most 10 decay times.
      expect(index).toBeGreaterThanOrEqual(T0);
      expect(index).toBeLessThanOrEqual(10 * T0);
      expect(index % 5).toBe(0);
    });
  }

  it("a stationary series is barely cut (≤ 2% of n over 10 seeds; MSER keeps data when there is no transient)", () => {
    for (let seed = 70; seed < 80; seed++) expect(mserCut(ar1(10_000, 0.5, seed)).index).toBeLessThanOrEqual(200);
  });

  it("the cut never exceeds half the series and the statistic is minimal at the cut", () => {
    const x = ar1(1000, 0.9, 81);
    for (let t = 0; t < 1000; t++) x[t] += 1000 - t; // a ramp over the whole series
    const r = mserCut(x);
    expect(r.index).toBeLessThanOrEqual(500);
    expect(Math.min(...r.statistic)).toBe(r.statistic[r.batchesCut]);
  });

  it("estimateSeries uses the MSER cut, so the planted transient no longer biases the mean", () => {
    const x = ar1(n, phi, 66);
    for (let t = 0; t < n; t++) x[t] += A * Math.exp(-t / T0);
    const e = estimateSeries(x);
    expect(e.cut.rule).toBe("mser-5");
    expect(e.cut.index).toBe(mserCut(x).index);
    expect(Math.abs(e.mean)).toBeLessThanOrEqual(4 * e.error); // true stationary mean is 0; 4σ
    const uncut = estimateSeries(x, { cut: 0 });
    // Uncut, the transient shifts the mean by ≈ A·T0/n ≈ 2.8 exact standard errors and inflates τ_int.
    expect(Math.abs(uncut.mean)).toBeGreaterThan(2 * ar1MeanError(phi, n));
    expect(uncut.tauInt).toBeGreaterThan(e.tauInt);
  });
});

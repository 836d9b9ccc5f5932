import { describe, expect, it } from "vitest";
import { jackknife, BIN_TAU_FACTOR } from "@/lib/analysis/jackknife";
import { gammaMethod } from "@/lib/analysis/gamma";
import { ar1, ar1MeanError, normals } from "./support";

function sampleSd(x: Float64Array): number {
  let m = 0;
  for (const v of x) m += v;
  m /= x.length;
  let ss = 0;
  for (const v of x) ss += (v - m) ** 2;
  return Math.sqrt(ss / (x.length - 1));
}

describe("jackknife (Quenouille 1956; Tukey 1958), blocked", () => {
  it("reproduces the exact standard error of a linear function identically (bins of 1)", () => {
    // For f linear in the means the leave-one-out values are x̄ − (x_i − x̄)/(n−1), so the
    // jackknife variance equals s²/n exactly (Efron & Stein 1981 / Tukey 1958): an identity, up to rounding.
    const x = normals(5000, 1, 2, 1.5);
    const y = normals(5000, 2, -1, 0.7);
    const r = jackknife([x, y], ([a, b]) => 2 * a - 3 * b + 1, { cut: 0, binSize: 1 });
    const z = new Float64Array(5000).map((_, i) => 2 * x[i] - 3 * y[i] + 1);
    expect(r.error / (sampleSd(z) / Math.sqrt(5000)) - 1).toBeLessThan(1e-10);
    expect(Math.abs(r.biasCorrected - r.mean)).toBeLessThan(1e-10); // no bias for a linear f
  });

  it("with bins of b, a linear function gets the standard error of the bin means identically", () => {
    const x = ar1(6000, 0.8, 3);
    const r = jackknife([x], ([a]) => a, { cut: 0, binSize: 50 });
    const bins = new Float64Array(120).map((_, b) => x.subarray(50 * b, 50 * b + 50).reduce((s, v) => s + v, 0) / 50);
    expect(Math.abs(r.error / (sampleSd(bins) / Math.sqrt(120)) - 1)).toBeLessThan(1e-10);
    expect(r.nBins).toBe(120);
    expect(r.n).toBe(6000);
  });

  it("ratio of means of independent normals: error matches the delta method within 3·errorOfError", () => {
    // Delta method (first order, exact as n → ∞): σ_R/R = sqrt(σx²/(n μx²) + σy²/(n μy²)).
    const n = 20_000;
    const [mx, sx, my, sy] = [5, 1, 2, 0.5];
    const x = normals(n, 4, mx, sx);
    const y = normals(n, 5, my, sy);
    const r = jackknife([x, y], ([a, b]) => a / b, { cut: 0 });
    const R = mx / my;
    const delta = R * Math.sqrt((sx * sx) / (n * mx * mx) + (sy * sy) / (n * my * my));
    expect(Math.abs(r.error - delta)).toBeLessThanOrEqual(3 * r.errorOfError);
    expect(Math.abs(r.biasCorrected - R)).toBeLessThanOrEqual(4 * delta); // 4σ on the value
  });

  it("default bins of 20 τ_int carry the autocorrelation: AR(1) φ = 0.9 mean error within 3·errorOfError + 2.5% bin bias of exact", () => {
    // Bins of b = 20 τ_int miss ≈ τ_exp/(2b)·… ≈ 2.5% of the error for AR(1) (from the exact
    // binned variance 2τ − 2φ(1−φ^b)/(b(1−φ)²), Madras & Sokal 1988); allow that on top of 3σ.
    const n = 1 << 18;
    const x = ar1(n, 0.9, 6);
    const r = jackknife([x], ([a]) => a, { cut: 0 });
    const tau = gammaMethod(x).tauInt;
    expect(r.binSize).toBe(Math.ceil(BIN_TAU_FACTOR * tau));
    const exact = ar1MeanError(0.9, n);
    expect(Math.abs(r.error - exact)).toBeLessThanOrEqual(3 * r.errorOfError + 0.025 * exact);
    // without bins the same data give an error ~sqrt(2τ_int) ≈ 4.4× too small
    const naive = jackknife([x], ([a]) => a, { cut: 0, binSize: 1 });
    expect(naive.error).toBeLessThan(0.3 * exact);
  });

  it("shares one cut across series (the largest MSER-5 cut) and records it", () => {
    const a = ar1(5000, 0.5, 7);
    const b = ar1(5000, 0.5, 8);
    for (let t = 0; t < 5000; t++) b[t] += 10 * Math.exp(-t / 100);
    const r = jackknife([a, b], ([u, v]) => u + v);
    expect(r.cut.rule).toBe("mser-5");
    expect(r.cut.index).toBeGreaterThanOrEqual(100);
    expect(r.n).toBeLessThanOrEqual(5000 - r.cut.index);
  });

  it("warns when the series is too short for bins of 20 τ_int", () => {
    const r = jackknife([ar1(2000, 0.99, 9)], ([a]) => a, { cut: 0 });
    expect(r.nBins).toBeGreaterThanOrEqual(20);
    expect(r.warnings.join()).toMatch(/fewer than 20 bins/);
  });
});

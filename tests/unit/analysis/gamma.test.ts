import { describe, expect, it } from "vitest";
import { gammaMethod } from "@/lib/analysis/gamma";
import { estimateSeries } from "@/lib/analysis/estimate";
import { ANALYSIS_VERSION } from "@/lib/analysis/version";
import { ar1, ar1MeanError, ar1TauInt, normals } from "./support";

// Sizes give n/τ_int ≥ 10⁴ so the stated errors are meaningful (Wolff 2004 asks for n ≫ τ_int),
// while the whole file stays at a few seconds.
const CASES = [
  { phi: 0.5, n: 1 << 16, seed: 11 },
  { phi: 0.9, n: 1 << 18, seed: 12 },
  { phi: 0.99, n: 1 << 20, seed: 13 },
] as const;

describe("Gamma method on AR(1) with exact τ_int = (1+φ)/(2(1−φ)) (Madras & Sokal 1988; Wolff 2004)", () => {
  for (const { phi, n, seed } of CASES) {
    const x = ar1(n, phi, seed);
    const exactTau = ar1TauInt(phi);
    const exactError = ar1MeanError(phi, n);

    for (const window of ["wolff", "madras-sokal"] as const) {
      it(`φ = ${phi}, n = ${n}, ${window} window: τ_int within 3·tauIntError of exact`, () => {
        const r = gammaMethod(x, { window });
        expect(r.windowConverged).toBe(true);
        expect(Math.abs(r.tauInt - exactTau)).toBeLessThanOrEqual(3 * r.tauIntError);
        // the stated error must itself be sane: a few percent at these n, not a blanket
        expect(r.tauIntError / exactTau).toBeLessThan(0.1);
      });

      it(`φ = ${phi}, ${window}: error of the mean within 3·errorOfError of exact σ·sqrt(2τ_int/n)`, () => {
        const r = gammaMethod(x, { window });
        expect(Math.abs(r.error - exactError)).toBeLessThanOrEqual(3 * r.errorOfError);
        // the true mean is 0: within 4 exact standard errors
        expect(Math.abs(r.mean)).toBeLessThanOrEqual(4 * exactError);
      });
    }
  }

  it("Madras–Sokal window honours W ≥ c·τ_int(W) with c = 6 (Madras & Sokal 1988)", () => {
    const r = gammaMethod(ar1(1 << 16, 0.9, 5), { window: "madras-sokal" });
    expect(r.windowParameter).toBe(6);
    expect(r.window).toBeGreaterThanOrEqual(6 * r.tauIntByWindow[r.window] - 1e-9);
    expect(r.window - 1).toBeLessThan(6 * r.tauIntByWindow[r.window - 1]);
  });

  it("normalised ACF ρ(1) matches φ within 4 Bartlett standard errors sqrt((1−φ²)/n) (Bartlett 1946)", () => {
    const phi = 0.9;
    const n = 1 << 18;
    const r = gammaMethod(ar1(n, phi, 21));
    expect(r.acf[0]).toBe(1);
    expect(Math.abs(r.acf[1] - phi)).toBeLessThanOrEqual(4 * Math.sqrt((1 - phi * phi) / n));
    expect(r.acf.length).toBe(r.tauIntByWindow.length);
    expect(r.tauIntByWindow[r.window]).toBeCloseTo(r.tauInt, 10);
  });

  it("white noise gives τ_int = 1/2 within 3·tauIntError (no correlation)", () => {
    const r = gammaMethod(normals(1 << 16, 31));
    expect(Math.abs(r.tauInt - 0.5)).toBeLessThanOrEqual(3 * r.tauIntError);
  });

  it("coverage: |mean| ≤ error for ~68.3% of 400 independent AR(1) chains (honest errors)", () => {
    // Binomial sd of the fraction is sqrt(0.683·0.317/400) = 0.023; allow 3 sd.
    let inside = 0;
    const chains = 400;
    for (let c = 0; c < chains; c++) {
      const r = gammaMethod(ar1(4096, 0.5, 1000 + c));
      if (Math.abs(r.mean) <= r.error) inside++;
    }
    expect(Math.abs(inside / chains - 0.6827)).toBeLessThanOrEqual(3 * 0.0233);
  });

  it("a constant series has zero error and says so instead of returning NaN", () => {
    const r = gammaMethod(new Float64Array(100).fill(0.1));
    expect(r.mean).toBe(0.1);
    expect(r.error).toBe(0);
    expect(r.tauInt).toBe(0.5);
    expect(r.warnings.join()).toMatch(/constant/);
  });

  it("a series too short for its correlation warns instead of pretending", () => {
    const r = gammaMethod(ar1(200, 0.99, 3));
    expect(r.warnings.some((w) => /unreliable|did not fire/.test(w))).toBe(true);
  });
});

describe("estimateSeries: cut + Gamma, versioned", () => {
  it("records the analysis version, the MSER-5 cut and both lengths", () => {
    const x = ar1(10_000, 0.5, 41);
    const e = estimateSeries(x);
    expect(e.analysisVersion).toBe(ANALYSIS_VERSION);
    expect(e.cut.rule).toBe("mser-5");
    expect(e.nTotal).toBe(10_000);
    expect(e.n).toBe(10_000 - e.cut.index);
    expect(e.method).toBe("gamma-wolff");
  });

  it("a user cut overrides MSER and is applied before the Gamma method", () => {
    const x = ar1(10_000, 0.5, 42);
    const e = estimateSeries(x, { cut: 3000 });
    expect(e.cut).toEqual({ index: 3000, rule: "user" });
    expect(e.n).toBe(7000);
    expect(e.mean).toBeCloseTo(gammaMethod(x.subarray(3000)).mean, 14);
  });
});

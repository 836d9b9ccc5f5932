import { describe, expect, it } from "vitest";
import { blockingAnalysis } from "@/lib/analysis/blocking";
import { gammaMethod } from "@/lib/analysis/gamma";
import { ar1, ar1MeanError, normals } from "./support";

describe("Flyvbjerg–Petersen blocking (Flyvbjerg & Petersen 1989)", () => {
  it("level 0 is the naive error sqrt(s²/n) and block sizes double with halving counts", () => {
    const x = normals(1000, 3);
    const b = blockingAnalysis(x);
    let m = 0;
    for (const v of x) m += v;
    m /= x.length;
    let ss = 0;
    for (const v of x) ss += (v - m) ** 2;
    expect(b.levels[0].error).toBeCloseTo(Math.sqrt(ss / (1000 * 999)), 14);
    for (let k = 1; k < b.levels.length; k++) {
      expect(b.levels[k].blockSize).toBe(2 * b.levels[k - 1].blockSize);
      expect(b.levels[k].nBlocks).toBe(Math.floor(b.levels[k - 1].nBlocks / 2));
    }
    expect(b.rule).toBe("flat-next-three");
  });

  for (const { phi, n, seed } of [
    { phi: 0.5, n: 1 << 16, seed: 51 },
    { phi: 0.9, n: 1 << 18, seed: 52 },
  ]) {
    const x = ar1(n, phi, seed);
    const b = blockingAnalysis(x);
    const g = gammaMethod(x);

    it(`AR(1) φ = ${phi}: blocking and Gamma errors agree within 3·sqrt(δB² + δG²) of their errors-of-errors`, () => {
      expect(b.plateauFound).toBe(true);
      const tol = 3 * Math.hypot(b.plateau.errorOfError, g.errorOfError);
      expect(Math.abs(b.plateau.error - g.error)).toBeLessThanOrEqual(tol);
    });

    it(`AR(1) φ = ${phi}: blocking plateau within 3·errorOfError of the exact error (Madras & Sokal 1988 τ_int)`, () => {
      expect(Math.abs(b.plateau.error - ar1MeanError(phi, n))).toBeLessThanOrEqual(3 * b.plateau.errorOfError);
      // correlated data: the naive level-0 error is far too small, so the curve does rise
      expect(b.levels[0].error).toBeLessThan(0.8 * b.plateau.error);
    });
  }

  it("white noise: plateau already flat at small blocks and equal to the naive error", () => {
    const b = blockingAnalysis(normals(1 << 14, 7));
    expect(b.plateau.blockSize).toBeLessThanOrEqual(4);
    expect(Math.abs(b.plateau.error - 1 / Math.sqrt(1 << 14))).toBeLessThanOrEqual(3 * b.plateau.errorOfError);
  });

  it("a curve that never flattens is reported with a warning, not as a plateau", () => {
    // τ_int ≈ 1000 with only 4096 points: no level with ≥ 32 blocks is past the correlation.
    const b = blockingAnalysis(ar1(4096, 0.999, 9));
    expect(b.plateauFound).toBe(false);
    expect(b.warnings.join()).toMatch(/never flattened/);
    expect(b.plateau.error).toBeLessThan(ar1MeanError(0.999, 4096));
  });
});

import { describe, expect, it } from "vitest";
import { combineReplicas } from "@/lib/analysis/replicas";
import { estimateSeries } from "@/lib/analysis/estimate";
import { chi2Survival, lnGamma } from "@/lib/analysis/special";
import { ar1, normalStream } from "./support";

describe("χ² tail used for the replica check", () => {
  it("matches closed forms: P(χ²₂ > x) = e^{−x/2}; P(χ²₁ > 3.841) = 0.05 (standard tables)", () => {
    for (const x of [0.1, 1, 4, 20]) expect(chi2Survival(x, 2)).toBeCloseTo(Math.exp(-x / 2), 12);
    expect(chi2Survival(3.841459, 1)).toBeCloseTo(0.05, 6);
    expect(lnGamma(10)).toBeCloseTo(Math.log(362880), 12);
  });
});

describe("combining replicas: inverse-variance mean, χ²/dof, disagreement flag (p < 0.01)", () => {
  it("reproduces a hand-computable case: 1±1 and 3±1 → 2 ± 1/√2, χ² = 2, p = 0.1573", () => {
    const c = combineReplicas([{ mean: 1, error: 1 }, { mean: 3, error: 1 }]);
    expect(c.mean).toBe(2);
    expect(c.error).toBeCloseTo(Math.SQRT1_2, 14);
    expect(c.chi2).toBe(2);
    expect(c.dof).toBe(1);
    expect(c.pValue).toBeCloseTo(0.1573, 4); // 2(1 − Φ(√2)), standard normal tables
    expect(c.disagree).toBe(false);
    expect(c.scaledError).toBeCloseTo(1, 14); // sqrt(χ²/dof) = √2 inflation
  });

  it("consistent replicas: mean χ²/dof over 200 draws of 5 replicas is 1 within 3·sqrt(2/(4·200))", () => {
    const next = normalStream(101);
    let sum = 0;
    let flagged = 0;
    const draws = 200;
    for (let d = 0; d < draws; d++) {
      const reps = [0.5, 1, 1, 2, 4].map((err) => ({ mean: 10 + err * next(), error: err }));
      const c = combineReplicas(reps);
      sum += c.chi2PerDof!;
      if (c.disagree) flagged++;
    }
    expect(Math.abs(sum / draws - 1)).toBeLessThanOrEqual(3 * Math.sqrt(2 / (4 * draws)));
    // flag rate should be ≈ 1%: ≤ 6 of 200 is within 3σ of the binomial (mean 2, sd 1.4)
    expect(flagged).toBeLessThanOrEqual(6);
  });

  it("eight AR(1) replicas estimated by the Gamma method combine without a flag and around the truth", () => {
    const reps = Array.from({ length: 8 }, (_, r) => estimateSeries(ar1(20_000, 0.9, 200 + r)));
    const c = combineReplicas(reps);
    expect(c.disagree).toBe(false);
    expect(Math.abs(c.mean)).toBeLessThanOrEqual(4 * c.error); // true mean 0, 4σ
  });

  it("a replica shifted by 6σ is flagged (p < 0.01)", () => {
    const reps = Array.from({ length: 6 }, (_, r) => estimateSeries(ar1(20_000, 0.9, 300 + r)));
    const shifted = { ...reps[0], mean: reps[0].mean + 6 * reps[0].error };
    const c = combineReplicas([shifted, ...reps.slice(1)]);
    expect(c.pValue!).toBeLessThan(0.01);
    expect(c.disagree).toBe(true);
    expect(c.scaledError).toBeGreaterThan(c.error);
  });

  it("a single replica passes through with no degrees of freedom (null, not NaN)", () => {
    const c = combineReplicas([{ mean: 4, error: 0.5 }]);
    expect(c).toMatchObject({ mean: 4, error: 0.5, dof: 0, chi2PerDof: null, pValue: null, disagree: false });
  });
});

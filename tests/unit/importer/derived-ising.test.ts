// Which derived ising2d quantities are formed from which series, and what happens without L and T.
import { describe, expect, it } from "vitest";
import { binderCumulant, specificHeat } from "@/lib/analysis";
import { derivedIsingEstimates } from "@/lib/estimates/derived-ising";

// An AR(1)-like chain (x_{t+1} = 0.5 x_t + noise) from a fixed linear congruential generator: cheap, deterministic, autocorrelated.
function chain(n: number, seed: number, offset: number, scale: number): Float64Array {
  const x = new Float64Array(n);
  let s = seed >>> 0;
  let v = 0;
  for (let i = 0; i < n; i++) {
    s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
    v = 0.5 * v + (s / 2 ** 32 - 0.5);
    x[i] = offset + scale * v;
  }
  return x;
}

describe("derivedIsingEstimates", () => {
  const m2 = chain(2000, 1, 0.5, 0.1);
  const m4 = m2.map((v) => v * v * 1.2);
  const e = chain(2000, 2, -1.4, 0.2);

  it("forms U4 from m2 and m4 and C from e, equal to the library's functions, and skips chi without absM", () => {
    const out = derivedIsingEstimates(new Map([["m2", m2], ["m4", m4], ["e", e]]), { L: 8, T: 2.3 });
    expect(out.map((o) => o.observable)).toEqual(["U4", "C"]);
    const [u4, c] = out as { result: { mean: number; error: number } }[];
    expect(u4.result).toMatchObject({ mean: binderCumulant(m2, m4).mean, error: binderCumulant(m2, m4).error });
    expect(c.result.mean).toBe(specificHeat(e, { sites: 64, temperature: 2.3 }).mean);
  });

  it("reports a problem for each quantity when L or T is missing or invalid", () => {
    for (const params of [{ L: 8 }, { T: 2.3 }, { L: 8.5, T: 2 }, { L: 8, T: -1 }]) {
      const out = derivedIsingEstimates(new Map([["e", e]]), params);
      expect(out.map((o) => o.observable)).toEqual(["U4", "chi", "C"]);
      expect(out.every((o) => "problem" in o && /needs params L/.test(o.problem))).toBe(true);
    }
  });

  it("turns an analysis refusal (too short a series) into a problem", () => {
    const out = derivedIsingEstimates(new Map([["e", e.subarray(0, 5)]]), { L: 8, T: 2.3 });
    expect(out).toHaveLength(1);
    expect(out[0]).toMatchObject({ observable: "C", problem: expect.stringMatching(/points|short/) });
  });
});

// oscillator (lattice path integral of the harmonic oscillator) against exact lattice results.
// Tolerance: SIGMA (4) binning standard errors (helpers.ts).
import { describe, expect, it } from "vitest";
import { SIGMA, binned, pull, runCore, type Estimate } from "./helpers";

/**
 * Exact lattice ⟨x²⟩. Derivation: S = Σ_i a[(m/2)((x_{i+1}−x_i)/a)² + (mω²/2)x_i²] = ½ xᵀAx with
 * A = (m/a)(2 − shift − shift⁻¹) + a m ω². A is circulant, diagonal in Fourier modes
 * e^{2πiki/N} with eigenvalues (m/a)(2 − 2cos(2πk/N)) + a m ω² = m a (4/a² sin²(πk/N) + ω²).
 * For the Gaussian weight e^{−S}, ⟨x_i²⟩ = (A⁻¹)_ii, the same for every i by translation
 * invariance, = (1/N) tr A⁻¹ = (1/N) Σ_k 1/(m a (4/a² sin²(πk/N) + ω²)).
 */
function exactX2(N: number, a: number, m: number, omega: number): number {
  let s = 0;
  for (let k = 0; k < N; k++) s += 1 / (m * a * ((4 / (a * a)) * Math.sin((Math.PI * k) / N) ** 2 + omega * omega));
  return s / N;
}

/**
 * Closed form (Creutz & Freedman 1981; recalled from memory, cross-checked below against
 * the mode sum): ⟨x²⟩ = (1 + R^N) / ((1 − R^N) · 2mω√(1 + a²ω²/4)),
 * R = 1 + a²ω²/2 − aω√(1 + a²ω²/4).
 */
function creutzFreedmanX2(N: number, a: number, m: number, omega: number): number {
  const q = Math.sqrt(1 + (a * a * omega * omega) / 4);
  const R = 1 + (a * a * omega * omega) / 2 - a * omega * q;
  return (1 + R ** N) / (1 - R ** N) / (2 * m * omega * q);
}

function check(est: Estimate, exact: number, what: string) {
  const msg = `${what}: measured ${est.mean.toFixed(5)} ± ${est.err.toExponential(2)} (tau ${est.tau.toFixed(1)}), exact ${exact.toFixed(5)}, pull ${pull(est, exact).toFixed(2)}`;
  console.log(msg);
  expect(Math.abs(est.mean - exact), msg).toBeLessThan(SIGMA * est.err);
}

describe("oscillator exact references", () => {
  it.each([
    [20, 1, 1, 1],
    [40, 0.5, 1, 1],
    [10, 0.3, 2, 1.5],
    [7, 2, 1, 0.7],
  ])("mode sum equals the Creutz–Freedman (1981) closed form, N=%i a=%f m=%f ω=%f", (N, a, m, w) => {
    expect(Math.abs(exactX2(N, a, m, w) / creutzFreedmanX2(N, a, m, w) - 1)).toBeLessThan(1e-12);
  });
});

describe("oscillator Metropolis vs exact lattice ⟨x²⟩ (two lattice spacings)", () => {
  it.each([
    { N: 20, a: 1, m: 1, omega: 1, step: 2.0, hits: 1, tau: 5 },
    { N: 40, a: 0.5, m: 1, omega: 1, step: 1.2, hits: 2, tau: 8 },
    { N: 16, a: 0.5, m: 2, omega: 1.5, step: 0.8, hits: 1, tau: 5 },
  ])("N=$N a=$a m=$m ω=$omega: ⟨x²⟩ and action per site", ({ tau, ...params }) => {
    const s = runCore("oscillator", params, { seed: `${params.N * 100 + params.a * 10}`, thermalization: 2000, measurements: 100_000 });
    check(binned(s.x2, tau), exactX2(params.N, params.a, params.m, params.omega), "x2");
    // Equipartition: a Gaussian action ½xᵀAx in N variables has ⟨S⟩ = N/2, so ⟨S/N⟩ = 1/2 exactly.
    check(binned(s.action, tau), 0.5, "action per site (equipartition)");
    const acc = s.acceptance.reduce((x, y) => x + y, 0) / s.acceptance.length;
    expect(acc).toBeGreaterThan(0.2);
    expect(acc).toBeLessThan(0.9);
  });
});

describe("oscillator virial ground-state energy E0 = mω²⟨x²⟩ → 1/2 as a → 0 (ħ = m = ω = 1)", () => {
  // Long lattices, N·a = 20: excited states are suppressed by e^{−20}, so the remaining
  // deviation from 1/2 is the O(a²) lattice artefact, exactly ½/√(1+a²/4) − ½ for N·a → ∞.
  it("approaches 1/2 as a shrinks, matching the exact lattice value at each a", () => {
    const runs = [
      { a: 1, step: 2.0, hits: 1, tau: 5 },
      { a: 0.5, step: 1.2, hits: 2, tau: 8 },
      { a: 0.25, step: 0.9, hits: 3, tau: 15 },
    ].map(({ a, step, hits, tau }) => {
      const N = Math.round(20 / a);
      const s = runCore("oscillator", { N, a, m: 1, omega: 1, step, hits }, { seed: `90${N}`, thermalization: 5000, measurements: 100_000 });
      const est = binned(s.x2, tau); // E0 = mω²⟨x²⟩ = ⟨x²⟩ here
      check(est, exactX2(N, a, 1, 1), `E0 at a=${a}`);
      return { a, est };
    });
    const [coarse, , fine] = runs;
    // At a=1 the lattice artefact (≈ −0.053) is resolved; at a=0.25 the gap is far smaller.
    expect(0.5 - coarse.est.mean).toBeGreaterThan(SIGMA * coarse.est.err + 0.03);
    const gapDiff = 0.5 - coarse.est.mean - Math.abs(0.5 - fine.est.mean);
    expect(gapDiff).toBeGreaterThan(SIGMA * Math.hypot(coarse.est.err, fine.est.err));
    expect(Math.abs(fine.est.mean - 0.5)).toBeLessThan(0.25 ** 2 / 16 + SIGMA * fine.est.err);
  });
});

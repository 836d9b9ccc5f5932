import { describe, expect, it } from "vitest";
import { heatKernel, logGrid } from "@/lib/analysis/heat-kernel";
import { countingFunction } from "@/lib/analysis/spectrum";
import { weylFit } from "@/lib/analysis/weyl";
import { torusLaplacianSpectrum } from "./support";

// L chosen so each spectrum has ~10⁶ eigenvalues: 1000², 100³, 32⁴.
const LATTICES = [
  { d: 2, L: 1000 },
  { d: 3, L: 100 },
  { d: 4, L: 32 },
] as const;

describe("spectral geometry of periodic-lattice Laplacians", () => {
  for (const { d, L } of LATTICES) {
    const spectrum = torusLaplacianSpectrum(d, L);
    const lambda1 = 4 * Math.sin(Math.PI / L) ** 2; // smallest positive eigenvalue
    // Plateau window: σ ≥ 5 keeps the lattice correction small, σ ≤ L²/40 keeps the torus'
    // winding terms ~ (L²/σ)·exp(−L²/(4σ)) below 0.2% (Poisson resummation of the 1D heat kernel).
    const plateau = logGrid(5, (L * L) / 40, 12);

    it(`d = ${d}, L = ${L}: d_s(σ) has a plateau at d between σ = 5 and L²/40`, () => {
      const { spectralDimension } = heatKernel(spectrum, { sigma: plateau });
      plateau.forEach((sigma, i) => {
        // Tolerance: the leading lattice correction d/(8σ) (large-σ expansion of the 1D lattice
        // heat kernel e^{−2σ} I₀(2σ), Abramowitz & Stegun 9.7.1) plus 1% for higher orders and
        // finite volume (both estimated < 0.5% in this window).
        expect(Math.abs(spectralDimension[i] - d)).toBeLessThanOrEqual(d / (8 * sigma) + 0.01 * d);
      });
    });

    it(`d = ${d}, L = ${L}: d_s falls to 0 at large σ (finite volume) while K → 1 zero mode`, () => {
      const sigma = logGrid((L * L) / 10, 20 / lambda1, 10);
      const h = heatKernel(spectrum, { sigma });
      for (let i = 1; i < sigma.length; i++) expect(h.spectralDimension[i]).toBeLessThan(h.spectralDimension[i - 1]);
      expect(h.spectralDimension[sigma.length - 1]).toBeLessThan(0.01 * d);
      expect(Math.abs(h.K[sigma.length - 1] - 1)).toBeLessThan(1e-6);
      expect(h.zeroModes).toBe(1);
    });

    it(`d = ${d}: small σ gives d_s = 2σ⟨λ⟩ with ⟨λ⟩ = 2d exactly (trace of the lattice Laplacian)`, () => {
      const h = heatKernel(spectrum, { sigma: new Float64Array([1e-6]) });
      expect(h.spectralDimension[0] / (4 * d * 1e-6) - 1).toBeLessThan(1e-5);
    });

    it(`d = ${d}: K factorises over dimensions, so d_s equals d × the 1D d_s (exact for product spaces)`, () => {
      const sigma = logGrid(0.1, 1000, 9);
      const full = heatKernel(spectrum, { sigma }).spectralDimension;
      const line = heatKernel(torusLaplacianSpectrum(1, L), { sigma }).spectralDimension;
      sigma.forEach((_, i) => expect(Math.abs(full[i] - d * line[i])).toBeLessThan(1e-9 * d));
    });

    it(`d = ${d}, L = ${L}: Weyl fit N(λ) ∝ λ^{d/2} on the default low-λ window gives d within 3·dimensionError (Weyl 1911)`, () => {
      const w = weylFit(spectrum);
      expect(Math.abs(w.dimension - d)).toBeLessThanOrEqual(3 * w.dimensionError);
      expect(w.dimensionError / d).toBeLessThan(0.03); // informative, not a blanket
      expect(w.zeroModes).toBe(1);
      expect(w.points).toBeGreaterThan(50);
    });
  }

  it("the default σ grid spans from 0.1/λ_max to 100/λ₁ with 64 points", () => {
    const h = heatKernel(torusLaplacianSpectrum(2, 50));
    expect(h.sigma.length).toBe(64);
    expect(h.sigma[0]).toBeCloseTo(0.1 / 8, 12);
    expect(h.sigma[63]).toBeCloseTo(100 / (4 * Math.sin(Math.PI / 50) ** 2), 6);
  });

  it("a gapped spectrum (no zero mode) does not underflow: ln K stays finite, d_s → 2σλ_min", () => {
    const h = heatKernel(new Float64Array([1, 2, 3]), { sigma: new Float64Array([1e4]) });
    expect(h.K[0]).toBe(0); // e^{−10⁴} underflows …
    expect(h.logK[0]).toBeCloseTo(-1e4, 6); // … its logarithm does not
    expect(h.spectralDimension[0]).toBeCloseTo(2e4, 6);
  });

  it("counting function N(λ) counts eigenvalues ≤ λ with multiplicity", () => {
    const eig = new Float64Array([0, 2, 1, 1, 3, 0]);
    const N = countingFunction(eig, new Float64Array([-1, 0, 0.5, 1, 2.5, 3, 10]));
    expect(Array.from(N)).toEqual([0, 2, 2, 4, 5, 6, 6]);
  });

  it("round-off negatives within zeroTolerance count as zero modes", () => {
    const h = heatKernel(new Float64Array([-1e-14, 1, 2]), { zeroTolerance: 1e-12, sigma: new Float64Array([100]) });
    expect(h.zeroModes).toBe(1);
    expect(h.K[0]).toBeCloseTo(1, 12);
  });
});

import { describe, expect, it } from "vitest";
import { binderCumulant, specificHeat, susceptibility } from "@/lib/analysis/observables";
import { normals } from "./support";

// Independent Gaussian "magnetisations" give exact moments: ⟨m²⟩ = s², ⟨m⁴⟩ = 3s⁴, ⟨|m|⟩ = s·sqrt(2/π).
const n = 20_000;
const s = 0.3;
const m = normals(n, 91, 0, s);
const m2 = m.map((v) => v * v);
const m4 = m.map((v) => v ** 4);
const absM = m.map(Math.abs);

describe("ready-made derived quantities with jackknife errors", () => {
  it("Binder cumulant of Gaussian fluctuations is 0 within 4σ (Binder 1981: disordered-phase limit)", () => {
    const u = binderCumulant(m2, m4, { cut: 0 });
    expect(Math.abs(u.biasCorrected)).toBeLessThanOrEqual(4 * u.error);
    expect(u.error).toBeGreaterThan(0);
    expect(u.error).toBeLessThan(0.05); // ≈ sqrt(var)/sqrt(n) level, not a blanket
  });

  it("Binder cumulant of a perfectly ordered phase (|m| = 1) is exactly 2/3 (Binder 1981)", () => {
    const one = new Float64Array(1000).fill(1);
    const u = binderCumulant(one, one, { cut: 0 });
    expect(u.mean).toBeCloseTo(2 / 3, 14);
    expect(u.error).toBeLessThan(1e-12); // zero up to rounding of the leave-one-out means
  });

  it("susceptibility χ = N(⟨m²⟩ − ⟨|m|⟩²)/T matches N s²(1 − 2/π)/T within 4σ (half-normal moments)", () => {
    const params = { sites: 256, temperature: 2.5 };
    const chi = susceptibility(absM, m2, params, { cut: 0 });
    const exact = (params.sites * s * s * (1 - 2 / Math.PI)) / params.temperature;
    expect(Math.abs(chi.biasCorrected - exact)).toBeLessThanOrEqual(4 * chi.error);
    expect(chi.error / exact).toBeLessThan(0.05);
  });

  it("specific heat C = N(⟨e²⟩ − ⟨e⟩²)/T² matches N s_e²/T² within 4σ for Gaussian energies", () => {
    const params = { sites: 100, temperature: 1.7 };
    const e = normals(n, 92, -1.4, 0.02);
    const c = specificHeat(e, params, { cut: 0 });
    const exact = (100 * 0.02 * 0.02) / (1.7 * 1.7);
    expect(Math.abs(c.biasCorrected - exact)).toBeLessThanOrEqual(4 * c.error);
    // error of a variance of Gaussian data: Var·sqrt(2/n) (exact for normal samples)
    expect(Math.abs(c.error - exact * Math.sqrt(2 / n))).toBeLessThanOrEqual(3 * c.errorOfError + 0.1 * c.error);
  });
});

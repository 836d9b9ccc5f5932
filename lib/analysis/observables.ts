import { AnalysisError, assertOption, assertSeries } from "./errors";
import { jackknife, type DerivedEstimate, type JackknifeOptions } from "./jackknife";

/** Lattice size and temperature for the thermodynamic derivatives (units k_B = J = 1). */
export interface ThermoParams {
  /** Number of lattice sites N (> 0); per-site observables are scaled back by N. */
  sites: number;
  /** Temperature T (> 0). */
  temperature: number;
}

/**
 * Binder cumulant U4 = 1 − ⟨m⁴⟩/(3⟨m²⟩²) (Binder 1981) from per-site series m2 = m², m4 = m⁴,
 * with blocked-jackknife error. Gaussian fluctuations give 0, a perfectly ordered phase 2/3.
 */
export function binderCumulant(m2: Float64Array, m4: Float64Array, options?: JackknifeOptions): DerivedEstimate {
  assertSeries(m2, "binderCumulant(m2)");
  assertSeries(m4, "binderCumulant(m4)");
  return jackknife([m2, m4], ([a, b]) => 1 - b / (3 * a * a), options);
}

/**
 * Magnetic susceptibility per site χ = N(⟨m²⟩ − ⟨|m|⟩²)/T from per-site series m2 = m² and
 * absM = |m|. Convention: |m| rather than m, because on a finite lattice without a field ⟨m⟩ = 0
 * by symmetry and the ⟨m⟩² form would measure χ of both ordered states mixed (common practice
 * in finite-size scaling). Input: equal-length series, sites > 0, temperature > 0.
 */
export function susceptibility(absM: Float64Array, m2: Float64Array, params: ThermoParams, options?: JackknifeOptions): DerivedEstimate {
  assertSeries(absM, "susceptibility(absM)");
  assertSeries(m2, "susceptibility(m2)");
  const { sites, temperature } = checkThermo(params, "susceptibility");
  return jackknife([m2, absM], ([sq, abs]) => (sites * (sq - abs * abs)) / temperature, options);
}

/**
 * Specific heat per site C = N(⟨e²⟩ − ⟨e⟩²)/T² from a per-site energy series e (fluctuation–
 * dissipation form; e² is built from e sweep by sweep). Input: finite series, sites > 0, T > 0.
 */
export function specificHeat(e: Float64Array, params: ThermoParams, options?: JackknifeOptions): DerivedEstimate {
  assertSeries(e, "specificHeat(e)");
  const { sites, temperature } = checkThermo(params, "specificHeat");
  const e2 = new Float64Array(e.length);
  for (let i = 0; i < e.length; i++) e2[i] = e[i] * e[i];
  return jackknife([e, e2], ([mean, sq]) => (sites * (sq - mean * mean)) / (temperature * temperature), options);
}

function checkThermo(params: ThermoParams, fn: string): ThermoParams {
  if (typeof params !== "object" || params === null) {
    throw new AnalysisError("INVALID_OPTION", `${fn}(params): expected { sites, temperature }`);
  }
  assertOption(params.sites, `${fn}(sites)`, "a positive integer", (v) => Number.isInteger(v) && v > 0);
  assertOption(params.temperature, `${fn}(temperature)`, "a finite number > 0", (v) => v > 0);
  return params;
}

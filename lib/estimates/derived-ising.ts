// Derived quantities of the 2D Ising model from a run's primary series, with blocked-jackknife errors.
import { AnalysisError, binderCumulant, specificHeat, susceptibility, type DerivedEstimate } from "@/lib/analysis";

/** Names under which the derived quantities are stored as observables. */
export const ISING_DERIVED = {
  U4: "Binder cumulant 1 − ⟨m⁴⟩/(3⟨m²⟩²)",
  chi: "susceptibility per site N(⟨m²⟩ − ⟨|m|⟩²)/T",
  C: "specific heat per site N(⟨e²⟩ − ⟨e⟩²)/T²",
} as const;

/** One derived estimate, or why it could not be formed. */
export type DerivedOutcome = { observable: keyof typeof ISING_DERIVED } & ({ result: DerivedEstimate } | { problem: string });

/**
 * U4 (from m2, m4), chi (from absM, m2) and C (from e) for an ising2d run with params L and T,
 * each formed only when its input series are present. N = L² sites. Analysis errors (too short,
 * degenerate) become problems, not failures: the primary estimates stand on their own.
 */
export function derivedIsingEstimates(series: ReadonlyMap<string, Float64Array>, params: Record<string, unknown>): DerivedOutcome[] {
  const L = params.L;
  const T = params.T;
  if (typeof L !== "number" || !Number.isInteger(L) || L <= 0 || typeof T !== "number" || !(T > 0)) {
    return (Object.keys(ISING_DERIVED) as (keyof typeof ISING_DERIVED)[]).map((observable) => ({
      observable, problem: `needs params L (positive integer) and T (> 0), got L=${String(L)}, T=${String(T)}`,
    }));
  }
  const thermo = { sites: L * L, temperature: T };
  const attempts: [keyof typeof ISING_DERIVED, string[], (s: Float64Array[]) => DerivedEstimate][] = [
    ["U4", ["m2", "m4"], ([m2, m4]) => binderCumulant(m2, m4)],
    ["chi", ["absM", "m2"], ([absM, m2]) => susceptibility(absM, m2, thermo)],
    ["C", ["e"], ([e]) => specificHeat(e, thermo)],
  ];
  const out: DerivedOutcome[] = [];
  for (const [observable, inputs, compute] of attempts) {
    const data = inputs.map((name) => series.get(name));
    if (data.some((d) => d === undefined)) continue;
    try {
      out.push({ observable, result: compute(data as Float64Array[]) });
    } catch (err) {
      if (!(err instanceof AnalysisError)) throw err;
      out.push({ observable, problem: err.message });
    }
  }
  return out;
}

// Derived quantities of the 2D Ising model from a run's primary series, with blocked-jackknife errors.
import {
  AnalysisError, BIN_TAU_FACTOR, binderCumulant, gammaMethod, jackknife, MIN_BINS, specificHeat, susceptibility,
  type DerivedEstimate, type JackknifeOptions,
} from "@/lib/analysis";

/** Names under which the derived quantities are stored as observables. */
export const ISING_DERIVED = {
  U4: "Binder cumulant 1 − ⟨m⁴⟩/(3⟨m²⟩²)",
  chi: "susceptibility per site N(⟨m²⟩ − ⟨|m|⟩²)/T",
  C: "specific heat per site N(⟨e²⟩ − ⟨e⟩²)/T²",
} as const;
type Derived = keyof typeof ISING_DERIVED;

/** What the primary estimate of an input series found: its cut and its tau_int. */
export type PrimaryFit = { cut: number; tauInt: number };

/** One derived estimate, or why it could not be formed. */
export type DerivedOutcome = { observable: Derived } & ({ result: DerivedEstimate } | { problem: string });

/**
 * Cut and bin size by the library's default rule — the largest cut among the inputs, bins of
 * ceil(20·max tau_int) capped so that at least 20 bins remain — with cut and tau_int taken from
 * the primary estimates (plus `extra` series measured here, e² for C). Null when the fits are
 * missing or the series is too short for 20 bins: the caller then uses the library defaults.
 */
export function binningFrom(fits: (PrimaryFit | undefined)[], length: number, extra: Float64Array[] = []): { cut: number; binSize: number; tauInt: number } | null {
  if (fits.some((f) => f === undefined)) return null;
  const cut = Math.max(...fits.map((f) => f!.cut));
  const cap = Math.floor((length - cut) / MIN_BINS);
  if (cap < 1) return null;
  const tauInt = Math.max(...fits.map((f) => f!.tauInt), ...extra.map((x) => gammaMethod(x.subarray(cut)).tauInt));
  return { cut, binSize: Math.min(Math.max(1, Math.ceil(BIN_TAU_FACTOR * tauInt)), cap), tauInt };
}

/** Means of consecutive bins of `binSize` points after `cut` (a remainder shorter than a bin is dropped). */
export function binMeans(x: Float64Array, cut: number, binSize: number): Float64Array {
  const bins = Math.floor((x.length - cut) / binSize);
  const out = new Float64Array(bins);
  for (let b = 0, i = cut; b < bins; b++) {
    let sum = 0;
    for (const end = i + binSize; i < end; i++) sum += x[i];
    out[b] = sum / binSize;
  }
  return out;
}

/**
 * U4 (from m2, m4), chi (from absM, m2) and C (from e) for an ising2d run with params L and T,
 * each formed only when its input series are present; N = L² sites. Analysis errors (too short,
 * degenerate) become problems, not failures: the primary estimates stand on their own.
 *
 * With the primary fits, the library's blocked jackknife runs on the bin means with bins of one:
 * mean and leave-one-out values are then exactly those of the blocked jackknife on the raw
 * series with the same cut and bin size, but the library's own tau_int estimate (a Gamma-method
 * pass per input, the bulk of an import's time on long series) runs on a few hundred bin means
 * instead of the whole series. Without fits the library defaults apply unchanged.
 */
export function derivedIsingEstimates(
  series: ReadonlyMap<string, Float64Array>, params: Record<string, unknown>, fits: ReadonlyMap<string, PrimaryFit> = new Map(),
): DerivedOutcome[] {
  const L = params.L;
  const T = params.T;
  if (typeof L !== "number" || !Number.isInteger(L) || L <= 0 || typeof T !== "number" || !(T > 0)) {
    return (Object.keys(ISING_DERIVED) as Derived[]).map((observable) => ({
      observable, problem: `needs params L (positive integer) and T (> 0), got L=${String(L)}, T=${String(T)}`,
    }));
  }
  const thermo = { sites: L * L, temperature: T };
  const ofBins: JackknifeOptions = { cut: 0, binSize: 1 };
  const square = (x: Float64Array) => x.map((v) => v * v);
  type Plan = { observable: Derived; inputs: string[]; raw: (s: Float64Array[]) => DerivedEstimate; extra: (s: Float64Array[]) => Float64Array[]; binned: (b: Float64Array[]) => DerivedEstimate };
  const plans: Plan[] = [
    { observable: "U4", inputs: ["m2", "m4"], raw: ([m2, m4]) => binderCumulant(m2, m4), extra: () => [], binned: ([m2, m4]) => binderCumulant(m2, m4, ofBins) },
    { observable: "chi", inputs: ["absM", "m2"], raw: ([a, m2]) => susceptibility(a, m2, thermo), extra: () => [], binned: ([a, m2]) => susceptibility(a, m2, thermo, ofBins) },
    {
      observable: "C", inputs: ["e"], raw: ([e]) => specificHeat(e, thermo), extra: ([e]) => [square(e)],
      // specificHeat squares its input point by point, so for bin means e² is binned separately; same formula.
      binned: ([e, e2]) => jackknife([e, e2], ([m, sq]) => (thermo.sites * (sq - m * m)) / (T * T), ofBins),
    },
  ];
  const out: DerivedOutcome[] = [];
  for (const plan of plans) {
    const data = plan.inputs.map((name) => series.get(name));
    if (data.some((d) => d === undefined)) continue;
    const x = data as Float64Array[];
    try {
      const extra = plan.extra(x);
      const bins = binningFrom(plan.inputs.map((n) => fits.get(n)), x[0].length, extra);
      if (!bins) { out.push({ observable: plan.observable, result: plan.raw(x) }); continue; }
      const r = plan.binned([...x, ...extra].map((s) => binMeans(s, bins.cut, bins.binSize)));
      out.push({
        observable: plan.observable,
        result: { ...r, binSize: bins.binSize, n: r.nBins * bins.binSize, nTotal: x[0].length, cut: { index: bins.cut, rule: "mser-5" }, tauIntMax: bins.tauInt },
      });
    } catch (err) {
      if (!(err instanceof AnalysisError)) throw err;
      out.push({ observable: plan.observable, problem: err.message });
    }
  }
  return out;
}

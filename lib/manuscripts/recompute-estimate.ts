import "server-only";
// Recompute one frozen estimate from what is stored: run estimates from their series with the recorded
// cut (and, for the derived ising2d quantities, the recorded fits of their inputs); point estimates by
// combining the frozen run estimates beneath them. Returns the fields that differ.
import { ANALYSIS_VERSION, combineReplicas, estimateSeries } from "@/lib/analysis";
import { derivedIsingEstimates, type PrimaryFit } from "@/lib/estimates/derived-ising";
import { loadSeries } from "@/lib/importer/load-series";
import { DERIVED_INPUTS } from "@/lib/provenance/add-run";
import type { EstimateFacts } from "@/lib/provenance/gather";

/** One field of an estimate that does not match on recomputation. */
export type EstimateDifference = { field: string; recorded: number | string | null; recomputed: number | string | null };

// Recomputation runs the same code on the same doubles, so results agree to the last bit; the relative
// 1e-12 only absorbs summation-order changes a refactoring of the library may bring (common practice).
const REL = 1e-12;
const same = (a: number | null, b: number | null) => a === b || (a !== null && b !== null && Math.abs(a - b) <= REL * Math.max(Math.abs(a), Math.abs(b)));

function compare(e: EstimateFacts, r: { mean: number; error: number; tauInt?: number | null; n?: number }): EstimateDifference[] {
  const out: EstimateDifference[] = [];
  for (const field of ["mean", "error", "tauInt", "n"] as const) {
    const got = r[field];
    if (got === undefined) continue;
    if (!same(e[field] as number | null, got)) out.push({ field, recorded: e[field] as number | null, recomputed: got });
  }
  return out;
}

/** Recompute estimate `e`; `siblings` are the run's other estimates (for derived inputs), `inputs` the run estimates of a point estimate. */
export async function recomputeEstimate(e: EstimateFacts, context: { sampler: string; params: Record<string, unknown>; siblings: EstimateFacts[]; inputs: EstimateFacts[] }): Promise<EstimateDifference[]> {
  if (e.analysisVersion !== ANALYSIS_VERSION) {
    return [{ field: "analysisVersion", recorded: e.analysisVersion, recomputed: ANALYSIS_VERSION }];
  }
  if (e.scope === "point") {
    const c = combineReplicas(context.inputs.map((i) => ({ mean: i.mean, error: i.error })));
    return compare(e, { mean: c.mean, error: c.scaledError });
  }
  const derivedFrom = context.sampler === "ising2d" ? DERIVED_INPUTS[e.observable] : undefined;
  if (!derivedFrom) {
    const x = await loadSeries(e.runId!, e.observable);
    const window = e.method === "gamma-madras-sokal" ? "madras-sokal" : "wolff";
    const r = estimateSeries(x, { cut: e.thermCut, window });
    return compare(e, { mean: r.mean, error: r.error, tauInt: r.tauInt, n: r.n });
  }
  // The fits the derivation used: each input's latest run estimate stored no later than this one.
  const series = new Map<string, Float64Array>();
  const fits = new Map<string, PrimaryFit>();
  for (const name of derivedFrom) {
    series.set(name, await loadSeries(e.runId!, name));
    const fit = context.siblings.filter((s) => s.observable === name && new Date(s.createdAt) <= new Date(e.createdAt)).sort((a, b) => b.version - a.version)[0];
    if (fit && fit.tauInt !== null) fits.set(name, { cut: fit.thermCut, tauInt: fit.tauInt });
  }
  const outcome = derivedIsingEstimates(series, context.params, fits).find((d) => d.observable === e.observable);
  if (!outcome || "problem" in outcome) return [{ field: "mean", recorded: e.mean, recomputed: outcome && "problem" in outcome ? outcome.problem : "not derivable" }];
  return compare(e, { mean: outcome.result.mean, error: outcome.result.error, n: outcome.result.n });
}

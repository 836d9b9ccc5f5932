import { AnalysisError, assertOption } from "./errors";
import { chi2Survival } from "./special";
import { ANALYSIS_VERSION } from "./version";

/** One replica's estimate as needed for combining: a mean and its (positive) standard error. */
export interface ReplicaValue {
  mean: number;
  error: number;
}

/** Inverse-variance combination of independent replicas of one parameter point. */
export interface CombinedEstimate {
  analysisVersion: string;
  method: "inverse-variance";
  mean: number;
  /** 1/sqrt(Σ 1/σ_i²): the error if the replicas agree. */
  error: number;
  /** error·sqrt(max(1, χ²/dof)): inflated when they scatter more than their errors (PDG scale-factor convention). */
  scaledError: number;
  replicas: number;
  chi2: number;
  dof: number;
  /** χ²/dof, or null with a single replica (no degrees of freedom). */
  chi2PerDof: number | null;
  /** P(χ²_dof ≥ observed χ²), or null with a single replica. */
  pValue: number | null;
  /** True when pValue < threshold: the replicas disagree beyond their errors. */
  disagree: boolean;
  threshold: number;
}

/** Options of {@link combineReplicas}. */
export interface CombineOptions {
  /** Flag replicas as disagreeing when the χ² p-value is below this; default 0.01. */
  threshold?: number;
}

/**
 * Weighted mean of replica estimates with weights 1/σ_i², its error, χ² = Σ (x_i − x̄)²/σ_i² with
 * dof = k − 1, and the χ² p-value; `disagree` is set when p < threshold (default 0.01).
 * Input: ≥ 1 replicas with finite means and finite errors > 0.
 */
export function combineReplicas(replicas: readonly ReplicaValue[], options: CombineOptions = {}): CombinedEstimate {
  const threshold = options.threshold ?? 0.01;
  assertOption(threshold, "combineReplicas(threshold)", "a number in (0, 1)", (v) => v > 0 && v < 1);
  if (!Array.isArray(replicas) || replicas.length === 0) {
    throw new AnalysisError("EMPTY_SERIES", "combineReplicas(replicas): expected at least one replica estimate");
  }
  replicas.forEach((r, i) => {
    if (typeof r !== "object" || r === null || !Number.isFinite(r.mean) || !Number.isFinite(r.error)) {
      throw new AnalysisError("NON_FINITE", `combineReplicas(replicas[${i}]): mean and error must be finite numbers, got ${JSON.stringify(r)}`);
    }
    if (r.error <= 0) {
      throw new AnalysisError("ZERO_ERROR", `combineReplicas(replicas[${i}]): error must be > 0 (it sets the weight 1/σ²), got ${r.error}`);
    }
  });

  let sw = 0;
  let swx = 0;
  for (const r of replicas) {
    const w = 1 / (r.error * r.error);
    sw += w;
    swx += w * r.mean;
  }
  const mean = swx / sw;
  let chi2 = 0;
  for (const r of replicas) chi2 += ((r.mean - mean) / r.error) ** 2;
  const dof = replicas.length - 1;
  const error = 1 / Math.sqrt(sw);
  const chi2PerDof = dof > 0 ? chi2 / dof : null;
  const pValue = dof > 0 ? chi2Survival(chi2, dof) : null;
  return {
    analysisVersion: ANALYSIS_VERSION,
    method: "inverse-variance",
    mean,
    error,
    scaledError: error * Math.sqrt(Math.max(1, chi2PerDof ?? 1)),
    replicas: replicas.length,
    chi2,
    dof,
    chi2PerDof,
    pValue,
    disagree: pValue !== null && pValue < threshold,
    threshold,
  };
}

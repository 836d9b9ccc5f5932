// Shapes the planner passes between its pure parts (formula, interpolation, plan) and its database parts.
import type { ParamValue } from "@/lib/spec/schema";

/**
 * One earlier chain's estimate of the chosen observable, as the planner reads it. tauInt is in
 * units of that chain's measurement interval (the spacing of its stored series), n counts the
 * measurements after the thermalisation cut, error is the Gamma-method error of the chain's mean.
 */
export type PilotChain = {
  estimateId: string;
  runId: string;
  ensembleId: string;
  params: Record<string, ParamValue>;
  mean: number;
  error: number;
  tauInt: number;
  n: number;
  /** Summation window of tau_int (null for jackknife-derived observables). */
  window: number | null;
  /** Measurements the MSER-5 cut discarded. */
  thermCut: number;
  /** Sweeps between measurements in the chain's ensemble. */
  interval: number;
  /** Sweeps the chain ran in all (thermalisation + measurements × interval). */
  sweeps: number | null;
  /** Wall seconds between the run's start and end as the scheduler reported them (what was charged). */
  wallSeconds: number | null;
  cores: number;
};

/** tau_int, variance and cost of the observable at one parameter point (measured or interpolated). */
export type PointStats = {
  /** tau_int in SWEEPS (chain tau_int × its interval), so chains with different intervals combine. */
  tauSweeps: number;
  /** Variance Γ(0) of a single measurement. */
  variance: number;
  /** Relative standard uncertainty of 2·tau_int·variance (the quantity N is proportional to). */
  relUncertainty: number;
  /** Wall seconds per sweep, null when no chain there recorded its times. */
  secondsPerSweep: number | null;
  /** Fixed seconds per run (start-up), fitted when the chains ran different lengths; else 0 (spread over the sweeps). */
  overheadSeconds: number;
  /** Measurements the pilot's thermalisation cut discarded, in sweeps (mean over chains). */
  cutSweeps: number;
  /** Measurements per chain at this point (smallest), for the few-measurements warning. */
  minN: number;
  chains: number;
};

/** A measured parameter point: the pilot chains there and their combined stats. */
export type MeasuredPoint = { params: Record<string, ParamValue>; stats: PointStats; chains: PilotChain[] };

/** How the stats at a requested point were obtained. */
export type Derivation =
  | { kind: "measured" }
  | { kind: "interpolated"; param: string; from: [number, number]; tau: "log-linear"; variance: "linear" }
  | { kind: "extrapolated"; param: string; nearest: number };

/** What the planner was asked. */
export type PlanRequest = {
  sampler: string;
  observable: string;
  targetError: number;
  replicas: number;
  /** The parameter points to plan for (a scan expanded by the caller). */
  points: Record<string, ParamValue>[];
  /** Sweeps between measurements of the planned ensemble; default the pilots' interval. */
  interval?: number;
  /** Sweeps before the first measurement; default the largest the pilots used. */
  thermalization?: number;
  cores?: number;
  /** Safety factor on the expected run time when suggesting a wall-time limit; default 1.5 (common practice). */
  wallMargin?: number;
};

/** The prediction at one parameter point. */
export type PointPlan = {
  params: Record<string, ParamValue>;
  derivation: Derivation;
  tauInt: number;
  variance: number;
  /** Measurements per replica after the cut that reach the target: ceil(2·tau_int·variance / (R·target²)). */
  measurementsNeeded: number;
  /** Relative uncertainty of measurementsNeeded, from the pilots' error-of-error. */
  relUncertainty: number;
  /** The error this point reaches with the plan's (uniform) measurements. */
  predictedError: number;
  predictedErrorUncertainty: number;
  secondsPerSweep: number | null;
  secondsPerRun: number | null;
  coreHours: number | null;
  /** Estimate ids behind these figures. */
  estimateIds: string[];
};

/** The planner's answer. */
export type Plan = {
  request: PlanRequest & { interval: number; thermalization: number; cores: number; wallMargin: number };
  points: PointPlan[];
  /** Measurements per replica for the spec: the largest need over the points, plus the thermalisation allowance. */
  measurements: number;
  /** Measurements added for the pilots' thermalisation cut. */
  cutAllowance: number;
  sweepsPerReplica: number;
  runs: number;
  /** Expected charge: Σ replicas × cores × seconds per run / 3600. */
  coreHours: number | null;
  /** Suggested wall-time limit per run (margin × slowest point's run time), in minutes. */
  wallMinutes: number | null;
  /** What reserving with that wall time costs: runs × cores × wallMinutes / 60. */
  reservationCoreHours: number | null;
  conventions: string[];
  assumptions: string[];
  warnings: string[];
};

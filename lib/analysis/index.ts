// Public API of the analysis library: pure functions over Float64Array, no framework imports,
// shared by the import pipeline and the route handlers.
export { ANALYSIS_VERSION } from "./version";
export { AnalysisError, type AnalysisErrorCode } from "./errors";
export type { Estimate, GammaResult, ThermalisationCut, CutRule, WindowMethod } from "./types";
export { autocovariance, paddedFftSize } from "./autocovariance";
export { gammaMethod, MIN_GAMMA_POINTS, type GammaOptions } from "./gamma";
export { estimateSeries, type EstimateOptions } from "./estimate";
export { mserCut, MSER_BATCH, MIN_MSER_POINTS, type MserResult } from "./mser";
export { blockingAnalysis, type BlockingLevel, type BlockingOptions, type BlockingResult } from "./blocking";
export { jackknife, BIN_TAU_FACTOR, MIN_BINS, type DerivedEstimate, type JackknifeOptions } from "./jackknife";
export { binderCumulant, specificHeat, susceptibility, type ThermoParams } from "./observables";
export { combineReplicas, type CombinedEstimate, type CombineOptions, type ReplicaValue } from "./replicas";
export { chi2Survival } from "./special";
export { countingFunction, prepareSpectrum, type PreparedSpectrum, type SpectrumOptions } from "./spectrum";
export { weylFit, WEYL_DEFAULT_COUNTS, type WeylFit, type WeylOptions } from "./weyl";
export { heatKernel, logGrid, type HeatKernelOptions, type HeatKernelResult } from "./heat-kernel";

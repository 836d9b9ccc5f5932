// The ensemble spec: format, schema, parsing, expansion, seeds and hash.
export { ensembleSpecSchema, type EnsembleSpec, type ScanAxis, type ParamValue } from "./schema";
export { SPEC_LIMITS, SPEC_FORMAT, RETRYABLE_REASONS } from "./limits";
export { parseSpec } from "./parse-spec";
export { expandSpec, axisValues, pointCount, type ExpandedPoint, type ExpandedRun } from "./expand-spec";
export { deriveSeed } from "./seeds";
export { specHash, canonicalJson } from "./spec-hash";

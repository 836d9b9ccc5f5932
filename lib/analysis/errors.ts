/** Machine-readable reasons an analysis input is rejected. */
export type AnalysisErrorCode =
  | "NOT_FLOAT64" // input is not a Float64Array
  | "EMPTY_SERIES"
  | "NON_FINITE" // NaN or ±Infinity entry
  | "TOO_SHORT" // fewer points than the method needs
  | "LENGTH_MISMATCH" // series that must be measured together have different lengths
  | "INVALID_OPTION" // an option is out of its documented range
  | "NEGATIVE_EIGENVALUE"
  | "INVALID_SIGMA" // heat-kernel σ not finite and positive
  | "ZERO_ERROR" // an input error bar of zero (infinite weight)
  | "DEGENERATE" // the data carry no information for the fit (e.g. one distinct point)
  | "FUNCTION_NOT_FINITE"; // a user-supplied derived function returned NaN/Infinity

/** The one error type of lib/analysis: a code plus a message saying what and where. */
export class AnalysisError extends Error {
  readonly code: AnalysisErrorCode;
  constructor(code: AnalysisErrorCode, message: string) {
    super(message);
    this.name = "AnalysisError";
    this.code = code;
  }
}

/** Throws unless `x` is a non-empty Float64Array of finite numbers with at least `minLength` entries. */
export function assertSeries(x: unknown, what: string, minLength = 1): asserts x is Float64Array {
  if (!(x instanceof Float64Array)) {
    throw new AnalysisError("NOT_FLOAT64", `${what}: expected a Float64Array, got ${describe(x)}`);
  }
  if (x.length === 0) throw new AnalysisError("EMPTY_SERIES", `${what}: series is empty`);
  const bad = firstNonFinite(x);
  if (bad >= 0) {
    throw new AnalysisError("NON_FINITE", `${what}: entry ${bad} is ${x[bad]} (all entries must be finite)`);
  }
  if (x.length < minLength) {
    throw new AnalysisError("TOO_SHORT", `${what}: has ${x.length} points, needs at least ${minLength}`);
  }
}

/** Throws unless `v` is a finite number satisfying `ok`; `rule` says the allowed range in words. */
export function assertOption(v: unknown, what: string, rule: string, ok: (v: number) => boolean): asserts v is number {
  if (typeof v !== "number" || !Number.isFinite(v) || !ok(v)) {
    throw new AnalysisError("INVALID_OPTION", `${what}: must be ${rule}, got ${describe(v)}`);
  }
}

/** Index of the first NaN/±Infinity entry, or -1. */
export function firstNonFinite(x: Float64Array): number {
  for (let i = 0; i < x.length; i++) if (!Number.isFinite(x[i])) return i;
  return -1;
}

function describe(v: unknown): string {
  if (v === null) return "null";
  if (typeof v === "number") return String(v);
  if (typeof v === "object") return (v as object).constructor?.name ?? "object";
  return typeof v;
}

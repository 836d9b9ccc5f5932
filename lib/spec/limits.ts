// Limits of one ensemble spec, stated once; the JSON Schema, parseSpec and docs/ensemble-spec.md use these.
export const SPEC_LIMITS = {
  /** Runs (points × replicas) in one ensemble. */
  runs: 10_000,
  /** Parameter points after the cartesian product. */
  points: 10_000,
  replicas: 100,
  /** Parameters scanned at once (dimensions of the cartesian product). */
  scanDimensions: 8,
  /** Values of one scanned parameter (explicit list or linear/log points). */
  valuesPerScan: 10_000,
  cores: 128,
  /** 7 days. */
  wallMinutes: 7 * 24 * 60,
  /** 1 TiB. */
  memoryMb: 1_048_576,
  thermalization: 1_000_000_000,
  measurements: 1_000_000_000,
  interval: 1_000_000,
  maxAttempts: 10,
  tags: 20,
  tagLength: 64,
  nameLength: 200,
  descriptionLength: 5000,
} as const;

/** Failure reasons a retry policy may name: the ones a new attempt can fix. */
export const RETRYABLE_REASONS = ["nonzero_exit", "wall_time_exceeded", "node_lost", "connection_lost", "dispatch_failed"] as const;
export type RetryableReason = (typeof RETRYABLE_REASONS)[number];

/** The spec format tag this code reads. */
export const SPEC_FORMAT = "ergodex.ensemble/1";

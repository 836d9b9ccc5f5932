/**
 * The ensemble spec format ("ergodex.ensemble/1") as a JSON Schema 2020-12, served at
 * GET /api/v1/schemas/ensemble-spec so editors can validate spec files. The schema checks shape;
 * parseSpec adds what a schema cannot say (sampler parameters at every expanded point, run limits).
 */
import { RETRYABLE_REASONS, SPEC_FORMAT, SPEC_LIMITS as L } from "./limits";

/** A scalar sampler parameter value. */
export type ParamValue = number | string | boolean;

/** One scanned parameter: explicit values, or evenly spaced on a linear or logarithmic axis. */
export type ScanAxis =
  | { param: string; values: ParamValue[] }
  | { param: string; linear: { from: number; to: number; points: number } }
  | { param: string; log: { from: number; to: number; points: number } };

/** A validated spec, defaults filled in. */
export interface EnsembleSpec {
  $schema?: string;
  format: typeof SPEC_FORMAT;
  name: string;
  description?: string;
  sampler: { name: string; version: string };
  fixed: Record<string, ParamValue>;
  scan: ScanAxis[];
  replicas: number;
  thermalization: number;
  measurements: number;
  interval: number;
  /** Unsigned 64-bit integer in decimal. */
  seed: string;
  resources: { cores: number; wallMinutes: number; memoryMb: number };
  retry: { maxAttempts: number; on: string[]; resumeOnWallTime: boolean };
  notify: { onFailure: boolean; onDone: boolean };
  tags: string[];
  cluster?: string;
  allocation?: string;
}

const paramName = { type: "string", pattern: "^[A-Za-z_][A-Za-z0-9_]{0,63}$", description: "a sampler parameter key" };
// anyOf, not a type list: the shared ajv instance runs in strict mode, which refuses union types.
const scalar = { anyOf: [{ type: "number" }, { type: "string" }, { type: "boolean" }], description: "a sampler parameter value" };
const count = (minimum: number, maximum: number, description: string) => ({ type: "integer", minimum, maximum, description });
const axis = (positive: boolean, what: string) => ({
  type: "object",
  description: what,
  properties: {
    from: positive ? { type: "number", exclusiveMinimum: 0 } : { type: "number" },
    to: positive ? { type: "number", exclusiveMinimum: 0 } : { type: "number" },
    points: count(2, L.valuesPerScan, "number of values, both ends included"),
  },
  required: ["from", "to", "points"],
  additionalProperties: false,
});

/** JSON Schema 2020-12 of an ensemble spec. */
export const ensembleSpecSchema = {
  $schema: "https://json-schema.org/draft/2020-12/schema",
  $id: "https://ergodex.invalid/schemas/ensemble-spec.json",
  title: "Ergodex ensemble spec",
  description: "One sampler at many parameter points (cartesian product of the scan), several replicas per point.",
  type: "object",
  properties: {
    $schema: { type: "string", description: "optional pointer to this schema, for editors" },
    format: { const: SPEC_FORMAT, description: "format and version of the spec" },
    name: { type: "string", minLength: 1, maxLength: L.nameLength, pattern: "\\S" },
    description: { type: "string", maxLength: L.descriptionLength },
    sampler: {
      type: "object",
      properties: { name: { type: "string", minLength: 1 }, version: { type: "string", minLength: 1 } },
      required: ["name", "version"],
      additionalProperties: false,
    },
    fixed: {
      type: "object",
      description: "parameters that are the same at every point",
      propertyNames: paramName,
      additionalProperties: scalar,
      default: {},
    },
    scan: {
      type: "array",
      description: "scanned parameters; the points are their cartesian product (empty: one point)",
      items: { $ref: "#/$defs/scanAxis" },
      maxItems: L.scanDimensions,
      default: [],
    },
    replicas: count(1, L.replicas, "independent Markov chains per point"),
    thermalization: count(0, L.thermalization, "sweeps before the first measurement"),
    measurements: count(1, L.measurements, "measurements per run"),
    interval: { ...count(1, L.interval, "sweeps between measurements"), default: 1 },
    seed: { type: "string", pattern: "^(0|[1-9][0-9]{0,19})$", description: "master seed: unsigned 64-bit integer in decimal" },
    resources: {
      type: "object",
      description: "what each run needs",
      properties: {
        cores: count(1, L.cores, "cores per run"),
        wallMinutes: count(1, L.wallMinutes, "wall-time limit per run attempt, in minutes (at most 7 days)"),
        memoryMb: { ...count(1, L.memoryMb, "memory per run in MiB"), default: 1024 },
      },
      required: ["cores", "wallMinutes"],
      additionalProperties: false,
    },
    retry: {
      type: "object",
      properties: {
        maxAttempts: { ...count(1, L.maxAttempts, "attempts per run in all (1 = no retry)"), default: 1 },
        on: { type: "array", items: { enum: [...RETRYABLE_REASONS] }, uniqueItems: true, default: [], description: "failure reasons that are retried" },
        resumeOnWallTime: { type: "boolean", default: false, description: "a run stopped at its wall time resumes from its checkpoint" },
      },
      additionalProperties: false,
      default: {},
    },
    notify: {
      type: "object",
      properties: {
        onFailure: { type: "boolean", default: true, description: "e-mail the owner when runs fail (one digest per ensemble)" },
        onDone: { type: "boolean", default: false, description: "e-mail the owner when every run has ended" },
      },
      additionalProperties: false,
      default: {},
    },
    tags: {
      type: "array",
      items: { type: "string", pattern: "^[A-Za-z0-9][A-Za-z0-9._:-]*$", maxLength: L.tagLength },
      uniqueItems: true,
      maxItems: L.tags,
      default: [],
    },
    cluster: { type: "string", minLength: 1, description: "cluster name; default: the only active cluster" },
    allocation: { type: "string", minLength: 1, description: "allocation name; default: the group's only current allocation" },
  },
  required: ["format", "name", "sampler", "replicas", "thermalization", "measurements", "seed", "resources"],
  additionalProperties: false,
  $defs: {
    scanAxis: {
      type: "object",
      properties: {
        param: paramName,
        values: { type: "array", items: scalar, minItems: 1, maxItems: L.valuesPerScan, uniqueItems: true },
        linear: axis(false, "points values from..to, evenly spaced"),
        log: axis(true, "points values from..to, evenly spaced in log (both > 0)"),
      },
      required: ["param"],
      additionalProperties: false,
      // Exactly one way of giving the values (the branches restate the key: ajv's strict mode wants it).
      oneOf: ["values", "linear", "log"].map((k) => ({ properties: { [k]: true }, required: [k] })),
    },
  },
} as const;

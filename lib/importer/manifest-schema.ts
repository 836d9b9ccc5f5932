// JSON Schema (2020-12) of manifest.json, format "ergodex.result/1" (DESIGN.md "Result bundle").

/** The format tag this importer reads. */
export const RESULT_FORMAT = "ergodex.result/1";

/** Observable and column names: safe as COPY text and as JSON keys. */
export const NAME_PATTERN = "^[A-Za-z][A-Za-z0-9_]{0,63}$";

// Extra top-level keys are allowed: a newer sampler may add provenance fields without a new format.
export const manifestSchema = {
  $schema: "https://json-schema.org/draft/2020-12/schema",
  $id: "https://ergodex.invalid/schemas/result-manifest.json",
  type: "object",
  required: ["format", "runId", "sampler", "params", "seed", "startedAt", "finishedAt", "host", "exitStatus", "observables", "series", "files"],
  properties: {
    format: { type: "string" },
    runId: { type: "string", minLength: 1, maxLength: 200 },
    sampler: {
      type: "object",
      required: ["name", "version"],
      properties: {
        name: { type: "string", minLength: 1, maxLength: 100 },
        version: { type: "string", minLength: 1, maxLength: 100 },
        commit: { type: "string", maxLength: 200 },
      },
    },
    params: { type: "object" },
    seed: { type: "string", pattern: "^(0|[1-9][0-9]{0,19})$" },
    startedAt: { type: "string", format: "date-time" },
    finishedAt: { type: "string", format: "date-time" },
    host: { type: "string", maxLength: 255 },
    exitStatus: { type: "integer" },
    observables: {
      type: "array",
      minItems: 1,
      maxItems: 256,
      items: {
        type: "object",
        required: ["name"],
        properties: { name: { type: "string", pattern: NAME_PATTERN }, description: { type: "string", maxLength: 1000 } },
      },
    },
    series: {
      type: "object",
      required: ["file", "encoding", "rows"],
      properties: {
        file: { type: "string", minLength: 1, maxLength: 255 },
        encoding: { enum: ["csv", "f64le"] },
        rows: { type: "integer", minimum: 1, maximum: 2147483647 },
      },
    },
    files: {
      type: "array",
      minItems: 1,
      maxItems: 1000,
      items: {
        type: "object",
        required: ["path", "sha256", "bytes"],
        properties: {
          path: { type: "string", minLength: 1, maxLength: 255 },
          sha256: { type: "string", pattern: "^[0-9a-f]{64}$" },
          bytes: { type: "integer", minimum: 0 },
        },
      },
    },
  },
} as const;

/** A manifest that passed the schema. */
export type Manifest = {
  format: string;
  runId: string;
  sampler: { name: string; version: string; commit?: string };
  params: Record<string, unknown>;
  seed: string;
  startedAt: string;
  finishedAt: string;
  host: string;
  exitStatus: number;
  observables: { name: string; description?: string }[];
  series: { file: string; encoding: "csv" | "f64le"; rows: number };
  files: { path: string; sha256: string; bytes: number }[];
};

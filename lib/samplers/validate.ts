/**
 * Validation of sampler parameters and run input against the shared schemas,
 * with one-line messages that say what is wrong and where.
 */
import Ajv2020, { type ErrorObject, type ValidateFunction } from "ajv/dist/2020";
import {
  SAMPLER_CATALOG,
  SAMPLER_NAMES,
  runInputSchema,
  type Ising2dParams,
  type LoggasParams,
  type OscillatorParams,
  type SamplerName,
} from "./schemas";

const ajv = new Ajv2020({ allErrors: false, verbose: true, strict: true });
const paramValidators = new Map<SamplerName, ValidateFunction>(
  SAMPLER_NAMES.map((n) => [n, ajv.compile(SAMPLER_CATALOG[n].paramsSchema)]),
);
const runInputValidator = ajv.compile(runInputSchema);

/** Result of a validation: the checked value, or a one-line reason. */
export type Checked<T> = { ok: true; value: T } | { ok: false; error: string };

function show(v: unknown): string {
  const s = JSON.stringify(v);
  return s === undefined ? String(v) : s.length > 60 ? s.slice(0, 57) + "..." : s;
}

/** Render the first ajv error as "where: what (got …)"; `root` names the checked object. */
export function formatAjvError(
  e: ErrorObject,
  root: string,
  schema?: { properties?: object; if?: { properties?: Record<string, { const?: unknown }> } },
): string {
  const where = root + e.instancePath.replace(/\//g, ".");
  const p = e.params as Record<string, unknown>;
  switch (e.keyword) {
    case "additionalProperties": {
      const allowed = schema?.properties ? ` (allowed: ${Object.keys(schema.properties).join(", ")})` : "";
      return `${where}: unknown parameter "${String(p.additionalProperty)}"${allowed}`;
    }
    case "required":
      return `${where}: missing required field "${String(p.missingProperty)}"`;
    case "false schema": {
      // Our schemas only use false schemas in if/then/else on one discriminating key.
      const [key, cond] = Object.entries(schema?.if?.properties ?? {})[0] ?? [];
      if (!key) return `${where}: not allowed here`;
      const when = `${key} ${show(cond?.const)}`;
      return e.schemaPath.startsWith("#/then") ? `${where}: not allowed with ${when}` : `${where}: only allowed with ${when}`;
    }
    case "enum":
      return `${where} must be one of ${(p.allowedValues as unknown[]).map(show).join(", ")} (got ${show(e.data)})`;
    case "const":
      return `${where} must be ${show(p.allowedValue)} (got ${show(e.data)})`;
    default:
      return `${where} ${e.message ?? "is invalid"} (got ${show(e.data)})`;
  }
}

/** True when `name` is a built-in sampler. */
export function isSamplerName(name: string): name is SamplerName {
  return (SAMPLER_NAMES as readonly string[]).includes(name);
}

/** Default Metropolis step of loggas: about one bulk level spacing π·R/(2N), R = sqrt(2βN) (+1 keeps β→0 sane). */
export function defaultLoggasStep(N: number, beta: number): number {
  return (Math.PI * Math.sqrt(2 * beta * N + 1)) / (2 * N);
}

/** Parameters with every documented default filled in (what the sampler actually runs). */
export type EffectiveParams = Required<Ising2dParams> | Required<OscillatorParams> | Required<LoggasParams>;

function withDefaults(name: SamplerName, params: Record<string, unknown>): Record<string, unknown> {
  switch (name) {
    case "ising2d": {
      const p = params as unknown as Ising2dParams;
      const out: Record<string, unknown> = { ...p, start: p.start ?? "cold" };
      if (p.algorithm === "metropolis") out.sweep = p.sweep ?? "sequential";
      return out;
    }
    case "oscillator":
      return { ...params, hits: (params as unknown as OscillatorParams).hits ?? 1 };
    case "loggas": {
      const p = params as unknown as LoggasParams;
      return p.method === "metropolis" ? { ...p, step: p.step ?? defaultLoggasStep(p.N, p.beta) } : { ...p };
    }
  }
}

/** Validate a sampler's params; on success returns them with defaults filled in. */
export function validateParams(name: string, params: unknown): Checked<Record<string, unknown>> {
  if (!isSamplerName(name)) {
    return { ok: false, error: `unknown sampler "${name}" (known: ${SAMPLER_NAMES.join(", ")})` };
  }
  const validate = paramValidators.get(name)!;
  if (!validate(params)) {
    return { ok: false, error: formatAjvError(validate.errors![0], "params", SAMPLER_CATALOG[name].paramsSchema) };
  }
  return { ok: true, value: withDefaults(name, params as Record<string, unknown>) };
}

/** The run.json contract (DESIGN.md), after validation. */
export type RunInput = {
  format: "ergodex.run/1";
  runId: string;
  sampler: { name: string; version: string };
  params: Record<string, unknown>;
  seed: string;
  thermalization: number;
  measurements: number;
  interval: number;
  encoding?: "csv" | "f64le";
};

/** Validate a parsed run.json (shape only; sampler params are checked by validateParams). */
export function validateRunInput(input: unknown): Checked<RunInput> {
  if (!runInputValidator(input)) {
    return { ok: false, error: formatAjvError(runInputValidator.errors![0], "run.json") };
  }
  const run = input as unknown as RunInput;
  if (BigInt(run.seed) >= 1n << 64n) {
    return { ok: false, error: `run.json.seed must be below 2^64 (got "${run.seed}")` };
  }
  return { ok: true, value: run };
}

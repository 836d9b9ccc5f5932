// parseSpec: a spec file (JSON or YAML text) or object → a validated EnsembleSpec, or AppError("invalid") with field paths.
import { parseDocument } from "yaml";
import { AppError, type FieldIssue } from "@/lib/errors";
import { ajv } from "@/lib/validation";
import { SAMPLER_CATALOG, SAMPLER_NAMES } from "@/lib/samplers/schemas";
import { isSamplerName } from "@/lib/samplers/validate";
import { checkPoints } from "./check-points";
import { axisValues } from "./expand-spec";
import { SPEC_LIMITS } from "./limits";
import { ensembleSpecSchema, type EnsembleSpec } from "./schema";
import { specIssues } from "./spec-issues";

// getSchema first: the shared instance refuses a second compile of the same $id.
const validateShape = ajv.getSchema(ensembleSpecSchema.$id) ?? ajv.compile(ensembleSpecSchema);

function refuse(issues: FieldIssue[]): never {
  const shown = issues.slice(0, 5).map((i) => `${i.path} ${i.message}`).join("; ");
  throw new AppError("invalid", `spec is invalid: ${shown}${issues.length > 5 ? `; and ${issues.length - 5} more` : ""}`, { issues });
}

/** Text → plain data: JSON when it looks like JSON (its messages are clearer), else YAML. */
function fromText(text: string): unknown {
  if (text.trim() === "") refuse([{ path: "/", message: "the spec is empty" }]);
  if (/^\s*[{[]/.test(text)) {
    try { return JSON.parse(text); } catch (err) {
      refuse([{ path: "/", message: `is not valid JSON: ${(err as Error).message}` }]);
    }
  }
  const doc = parseDocument(text, { prettyErrors: true });
  if (doc.errors.length > 0) {
    const e = doc.errors[0];
    const where = e.linePos ? ` at line ${e.linePos[0].line}, column ${e.linePos[0].col}` : "";
    refuse([{ path: "/", message: `is not valid YAML${where}: ${e.message.split("\n")[0].replace(/ at line \d+, column \d+:?$/, "")}` }]);
  }
  return doc.toJS();
}

/** Checks a schema cannot express: seed range, known sampler and version, scan axes, limits. */
function semanticIssues(spec: EnsembleSpec): FieldIssue[] {
  const issues: FieldIssue[] = [];
  if (BigInt(spec.seed) >= 1n << 64n) issues.push({ path: "/seed", message: `must be below 2^64 = 18446744073709551616 (got ${spec.seed})` });
  const { name, version } = spec.sampler;
  if (!isSamplerName(name)) issues.push({ path: "/sampler/name", message: `unknown sampler "${name}" (known: ${SAMPLER_NAMES.join(", ")})` });
  else if (SAMPLER_CATALOG[name].version !== version) {
    issues.push({ path: "/sampler/version", message: `${name} has version ${SAMPLER_CATALOG[name].version} (got "${version}")` });
  }
  spec.scan.forEach((axis, i) => {
    const first = spec.scan.findIndex((a) => a.param === axis.param);
    if (first < i) issues.push({ path: `/scan/${i}/param`, message: `"${axis.param}" is already scanned at /scan/${first}` });
    if (Object.hasOwn(spec.fixed, axis.param)) issues.push({ path: `/scan/${i}/param`, message: `"${axis.param}" is also given in fixed; give it in one place` });
    if (!("values" in axis)) {
      const kind = "linear" in axis ? "linear" : "log";
      const v = axisValues(axis);
      if (new Set(v).size !== v.length) issues.push({ path: `/scan/${i}/${kind}`, message: `gives repeated values (${v.slice(0, 4).join(", ")}…): make from and to differ more or use fewer points` });
    }
  });
  const points = spec.scan.reduce((n, a) => n * axisValues(a).length, 1);
  const runs = points * spec.replicas;
  if (points > SPEC_LIMITS.points) issues.push({ path: "/scan", message: `expands to ${points.toLocaleString("en")} points; at most ${SPEC_LIMITS.points.toLocaleString("en")} per ensemble` });
  else if (runs > SPEC_LIMITS.runs) {
    issues.push({ path: "/scan", message: `expands to ${points.toLocaleString("en")} points × ${spec.replicas} replicas = ${runs.toLocaleString("en")} runs; at most ${SPEC_LIMITS.runs.toLocaleString("en")} per ensemble` });
  }
  return issues;
}

/**
 * Parse and validate an ensemble spec: JSON or YAML text, or already-parsed data (not modified).
 * Returns the spec with defaults filled in; throws AppError("invalid") whose details.issues locate
 * every problem by JSON path, including the sampler parameters at every expanded point.
 */
export function parseSpec(input: unknown): EnsembleSpec {
  const data = typeof input === "string" ? fromText(input) : structuredClone(input);
  if (data === null || typeof data !== "object" || Array.isArray(data)) refuse([{ path: "/", message: "must be an object (a mapping of spec fields)" }]);
  if (!validateShape(data)) refuse(specIssues(validateShape.errors));
  const spec = data as EnsembleSpec;
  const issues = semanticIssues(spec);
  if (issues.length > 0) refuse(issues);
  const pointIssues = checkPoints(spec, spec.sampler.name as (typeof SAMPLER_NAMES)[number]);
  if (pointIssues.length > 0) refuse(pointIssues);
  return spec;
}

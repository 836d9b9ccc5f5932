// Every expanded point's parameters checked against its sampler's schema, each problem located in the spec.
import Ajv2020, { type ErrorObject, type ValidateFunction } from "ajv/dist/2020";
import type { FieldIssue } from "@/lib/errors";
import { SAMPLER_CATALOG, SAMPLER_NAMES, type SamplerName } from "@/lib/samplers/schemas";
import { formatAjvError } from "@/lib/samplers/validate";
import { axisPositions, axisValues } from "./expand-spec";
import type { EnsembleSpec, ParamValue } from "./schema";

// A private instance: the shared one in lib/validation fills defaults, which would put e.g. ising2d's
// default `sweep` into a wolff point and then refuse it. verbose: error messages show the bad value.
const ajv = new Ajv2020({ allErrors: true, verbose: true, strict: true });
const validators = new Map<SamplerName, ValidateFunction>(SAMPLER_NAMES.map((n) => [n, ajv.compile(SAMPLER_CATALOG[n].paramsSchema)]));

/** The parameter key an ajv error of a params object is about. */
function keyOf(e: ErrorObject): string | null {
  const p = e.params as Record<string, unknown>;
  if (e.keyword === "required") return String(p.missingProperty);
  if (e.keyword === "additionalProperties") return String(p.additionalProperty);
  return e.instancePath.split("/")[1] ?? null;
}

const show = (params: Record<string, ParamValue>) => Object.entries(params).map(([k, v]) => `${k}=${JSON.stringify(v)}`).join(", ");

/**
 * Issues of the sampler parameters at every point of the scan (the first message per path; at most
 * `max`). A scanned value is located at /scan/i/values/j, or at /scan/i/linear|log for generated
 * values; a fixed one at /fixed/<key>; a missing one at /fixed/<key>; an unknown scanned key at /scan/i/param.
 */
export function checkPoints(spec: EnsembleSpec, sampler: SamplerName, max = 50): FieldIssue[] {
  const validate = validators.get(sampler)!;
  const schema = SAMPLER_CATALOG[sampler].paramsSchema as Parameters<typeof formatAjvError>[2];
  const values = spec.scan.map(axisValues);
  const byPath = new Map<string, string>();
  for (const [index, pos] of axisPositions(values.map((v) => v.length)).entries()) {
    const params: Record<string, ParamValue> = { ...spec.fixed };
    spec.scan.forEach((axis, d) => { params[axis.param] = values[d][pos[d]]; });
    if (validate(params)) continue;
    for (const e of validate.errors ?? []) {
      if (e.keyword === "if") continue; // its then/else branch reports the actual problem
      const key = keyOf(e);
      const d = key === null ? -1 : spec.scan.findIndex((a) => a.param === key);
      let path: string;
      let message = `${sampler} ${formatAjvError(e, "params", schema)}`;
      if (e.keyword === "required") {
        path = `/fixed/${key}`;
        message = `is required by ${sampler}: give it in fixed or scan it`;
      } else if (d >= 0) {
        const axis = spec.scan[d];
        if (e.keyword === "additionalProperties") path = `/scan/${d}/param`;
        else if ("values" in axis) path = `/scan/${d}/values/${pos[d]}`;
        else {
          path = `/scan/${d}/${"linear" in axis ? "linear" : "log"}`;
          message += ` at point ${index} (${show(params)})`;
        }
      } else {
        path = key === null ? "/fixed" : `/fixed/${key}`;
      }
      if (!byPath.has(path)) byPath.set(path, message);
      if (byPath.size >= max) break;
    }
    if (byPath.size >= max) break;
  }
  return [...byPath].map(([path, message]) => ({ path, message }));
}

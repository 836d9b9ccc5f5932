// One ajv instance (JSON Schema 2020-12) for every edge of the system; errors become field issues.
import Ajv2020, { type ErrorObject, type ValidateFunction } from "ajv/dist/2020";
import addFormats from "ajv-formats";
import { AppError, type FieldIssue } from "./errors";

export const ajv = new Ajv2020({ allErrors: true, strict: true, useDefaults: true, coerceTypes: false });
addFormats(ajv);

const cache = new WeakMap<object, ValidateFunction>();
function compiled(schema: object): ValidateFunction {
  let v = cache.get(schema);
  if (!v) { v = ajv.compile(schema); cache.set(schema, v); }
  return v;
}

/** ajv errors as {path, message}, the path pointing at the offending field. */
export function toIssues(errors: ErrorObject[] | null | undefined): FieldIssue[] {
  return (errors ?? []).map((e) => {
    let path = e.instancePath || "/";
    if (e.keyword === "required") path = `${e.instancePath}/${(e.params as { missingProperty: string }).missingProperty}`;
    if (e.keyword === "additionalProperties") path = `${e.instancePath}/${(e.params as { additionalProperty: string }).additionalProperty}`;
    const message = e.keyword === "additionalProperties" ? "is not a known field" : e.keyword === "required" ? "is required" : e.message ?? "is invalid";
    return { path, message };
  });
}

/** Validate or throw AppError("invalid") listing every failing field. */
export function validate<T>(schema: object, data: unknown, what = "input"): T {
  const v = compiled(schema);
  if (!v(data)) {
    const issues = toIssues(v.errors);
    throw new AppError("invalid", `${what} is invalid: ${issues.map((i) => `${i.path} ${i.message}`).join("; ")}`, { issues });
  }
  return data as T;
}

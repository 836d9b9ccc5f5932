// ajv errors of the spec schema as field issues: one per problem, located by JSON path.
import type { ErrorObject } from "ajv/dist/2020";
import { toIssues } from "@/lib/validation";
import type { FieldIssue } from "@/lib/errors";

// Messages for the schema's alternatives, whose branch errors alone would say little.
const ALTERNATIVES: Record<string, string> = {
  "#/$defs/scanAxis/oneOf": "needs exactly one of values, linear or log",
};
const SCALAR = "must be a number, a string or a boolean";

/**
 * Branch errors of anyOf/oneOf are folded into one message for the alternative; the seed, which
 * YAML or JSON writers often leave unquoted, gets a hint; duplicates of a path + message are dropped.
 */
export function specIssues(errors: ErrorObject[] | null | undefined): FieldIssue[] {
  const all = errors ?? [];
  const alternatives = all.filter((e) => e.keyword === "oneOf" || e.keyword === "anyOf");
  const kept = all.filter((e) => !alternatives.some((a) => a !== e && e.schemaPath.startsWith(a.schemaPath + "/") && e.instancePath === a.instancePath));
  const issues = kept.map((e): FieldIssue => {
    const [issue] = toIssues([e]);
    if (e.keyword === "oneOf" || e.keyword === "anyOf") return { path: issue.path, message: ALTERNATIVES[e.schemaPath] ?? SCALAR };
    if (e.instancePath === "/seed" && e.keyword === "type") return { path: "/seed", message: "must be a string of decimal digits (quote it: large integers lose precision as numbers)" };
    if (e.instancePath === "/seed" && e.keyword === "pattern") return { path: "/seed", message: "must be an unsigned 64-bit integer in decimal digits, without sign or leading zeros" };
    return issue;
  });
  const seen = new Set<string>();
  return issues.filter((x) => { const k = `${x.path}\u0000${x.message}`; if (seen.has(k)) return false; seen.add(k); return true; });
}

// The re-analysis choices a person may make for one run's observable: cut, window rule and its parameter.
import { AppError, type FieldIssue } from "@/lib/errors";

/** Choices of a re-analysis; omitted fields fall back to the automatic analysis (MSER-5 cut, Wolff window S = 1.5). */
export type AnalysisChoice = { observable: string; cut?: number; window?: "wolff" | "madras-sokal"; S?: number; c?: number };

const NAME = /^[A-Za-z0-9][A-Za-z0-9_.+-]{0,63}$/;

/** Parse a choice from URL params (GET analysis) or a JSON body (POST estimates); 422 names each field. */
export function parseAnalysisChoice(input: URLSearchParams | Record<string, unknown>): AnalysisChoice {
  const get = (k: string): unknown => (input instanceof URLSearchParams ? input.get(k) ?? undefined : input[k]);
  const issues: FieldIssue[] = [];
  const number = (k: string, check: (n: number) => boolean, what: string): number | undefined => {
    const raw = get(k);
    if (raw === undefined || raw === null || raw === "") return undefined;
    const n = typeof raw === "number" ? raw : typeof raw === "string" && raw.trim() !== "" ? Number(raw) : NaN;
    if (!Number.isFinite(n) || !check(n)) { issues.push({ path: k, message: `must be ${what}, got ${JSON.stringify(raw)}` }); return undefined; }
    return n;
  };
  if (!(input instanceof URLSearchParams)) {
    for (const k of Object.keys(input)) if (!["observable", "cut", "window", "S", "c"].includes(k)) issues.push({ path: k, message: "is not a known field" });
  }
  const observable = get("observable");
  if (typeof observable !== "string" || !NAME.test(observable)) issues.push({ path: "observable", message: "must name an observable of the run" });
  const window = get("window");
  if (window !== undefined && window !== null && window !== "" && window !== "wolff" && window !== "madras-sokal") {
    issues.push({ path: "window", message: 'must be "wolff" or "madras-sokal"' });
  }
  const choice: AnalysisChoice = {
    observable: observable as string,
    cut: number("cut", (n) => Number.isInteger(n) && n >= 0, "an integer ≥ 0 (measurements to discard)"),
    window: window === "wolff" || window === "madras-sokal" ? window : undefined,
    S: number("S", (n) => n > 0 && n <= 100, "a number in (0, 100]"),
    c: number("c", (n) => n > 0 && n <= 100, "a number in (0, 100]"),
  };
  if (choice.S !== undefined && choice.window === "madras-sokal") issues.push({ path: "S", message: "belongs to the wolff window; use c for madras-sokal" });
  if (choice.c !== undefined && choice.window !== "madras-sokal") issues.push({ path: "c", message: 'belongs to window "madras-sokal"' });
  if (issues.length) throw new AppError("invalid", `analysis choice is invalid: ${issues.map((i) => `${i.path} ${i.message}`).join("; ")}`, { issues });
  return choice;
}

/** JSON Schema of the POST /runs/:id/estimates body (the detailed checks follow in parseAnalysisChoice). */
export const reanalysisBodySchema = {
  type: "object", additionalProperties: false, required: ["observable"],
  properties: {
    observable: { type: "string" }, cut: { type: "integer", minimum: 0 }, window: { enum: ["wolff", "madras-sokal"] },
    S: { type: "number", exclusiveMinimum: 0 }, c: { type: "number", exclusiveMinimum: 0 },
  },
} as const;

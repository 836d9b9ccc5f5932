// A corpus of malformed specs, each refused with the JSON path of the offending field.
import { describe, expect, it } from "vitest";
import { parseSpec, SPEC_LIMITS } from "@/lib/spec";
import { AppError } from "@/lib/errors";

const good = () => ({
  format: "ergodex.ensemble/1", name: "Ising near Tc", sampler: { name: "ising2d", version: "1.0.0" },
  fixed: { L: 8, algorithm: "metropolis" } as Record<string, unknown>, scan: [{ param: "T", values: [2.2, 2.3] }] as unknown[],
  replicas: 2, thermalization: 100, measurements: 500, interval: 1, seed: "42",
  resources: { cores: 1, wallMinutes: 10, memoryMb: 512 } as Record<string, unknown>, tags: ["test"],
});
type Spec = ReturnType<typeof good>;

function issuesOf(input: unknown): { path: string; message: string }[] {
  try {
    parseSpec(input);
  } catch (err) {
    expect(err).toBeInstanceOf(AppError);
    expect((err as AppError).code).toBe("invalid");
    return (err as AppError).details!.issues!;
  }
  throw new Error("the spec was accepted");
}

const CORPUS: [string, (s: Spec) => unknown, string, RegExp][] = [
  ["unknown sampler", (s) => ({ ...s, sampler: { name: "potts3d", version: "1.0.0" } }), "/sampler/name", /unknown sampler "potts3d".*ising2d/],
  ["unknown sampler version", (s) => ({ ...s, sampler: { name: "ising2d", version: "9.9.9" } }), "/sampler/version", /1\.0\.0/],
  ["unknown spec format version", (s) => ({ ...s, format: "ergodex.ensemble/2" }), "/format", /constant/],
  ["out-of-range fixed parameter", (s) => ({ ...s, fixed: { ...s.fixed, L: 1 } }), "/fixed/L", /L must be >= 2/],
  ["out-of-range scanned value, located by its index", (s) => ({ ...s, scan: [{ param: "T", values: [2.2, -1, 2.4] }] }), "/scan/0/values/1", /T must be > 0 \(got -1\)/],
  ["out-of-range generated value, located at its axis", (s) => ({ ...s, scan: [{ param: "T", linear: { from: -1, to: 2, points: 4 } }] }), "/scan/0/linear", /T must be > 0.*at point 0/],
  ["unknown fixed parameter", (s) => ({ ...s, fixed: { ...s.fixed, J: 1 } }), "/fixed/J", /unknown parameter "J"/],
  ["unknown scanned parameter", (s) => ({ ...s, scan: [{ param: "h", values: [0.1] }] }), "/scan/0/param", /unknown parameter "h"/],
  ["missing sampler parameter", (s) => ({ ...s, fixed: { algorithm: "metropolis" } }), "/fixed/L", /required by ising2d/],
  ["parameter not allowed with another's value", (s) => ({ ...s, fixed: { L: 8, algorithm: "wolff", sweep: "checkerboard" } }), "/fixed/sweep", /not allowed with algorithm "wolff"/],
  ["empty scan values", (s) => ({ ...s, scan: [{ param: "T", values: [] }] }), "/scan/0/values", /fewer than 1/],
  ["scan axis without values", (s) => ({ ...s, scan: [{ param: "T" }] }), "/scan/0", /exactly one of values, linear or log/],
  ["scan axis with two kinds of values", (s) => ({ ...s, scan: [{ param: "T", values: [2], log: { from: 1, to: 2, points: 2 } }] }), "/scan/0", /exactly one/],
  ["huge axis", (s) => ({ ...s, scan: [{ param: "T", linear: { from: 1, to: 3, points: 1_000_000 } }] }), "/scan/0/linear/points", /must be <= 10000/],
  ["huge cartesian product", (s) => ({ ...s, fixed: { algorithm: "metropolis" }, scan: [{ param: "T", linear: { from: 1, to: 3, points: 200 } }, { param: "L", linear: { from: 8, to: 207, points: 200 } }] }), "/scan", /40,000 points/],
  ["points × replicas above the run limit", (s) => ({ ...s, replicas: 100, scan: [{ param: "T", linear: { from: 1, to: 3, points: 101 } }] }), "/scan", /101 points × 100 replicas = 10,100 runs; at most 10,000/],
  ["too many replicas", (s) => ({ ...s, replicas: 101 }), "/replicas", /<= 100/],
  ["replicas of the wrong type", (s) => ({ ...s, replicas: "two" }), "/replicas", /must be integer/],
  ["fractional measurements", (s) => ({ ...s, measurements: 10.5 }), "/measurements", /must be integer/],
  ["a parameter value that is a list", (s) => ({ ...s, fixed: { ...s.fixed, L: [8, 16] } }), "/fixed/L", /number, a string or a boolean/],
  ["a parameter of the wrong type for the sampler", (s) => ({ ...s, fixed: { ...s.fixed, L: "8" } }), "/fixed/L", /must be integer/],
  ["tags not a list", (s) => ({ ...s, tags: "critical" }), "/tags", /must be array/],
  ["wall time over 7 days", (s) => ({ ...s, resources: { ...s.resources, wallMinutes: SPEC_LIMITS.wallMinutes + 1 } }), "/resources/wallMinutes", /<= 10080/],
  ["wall time zero", (s) => ({ ...s, resources: { ...s.resources, wallMinutes: 0 } }), "/resources/wallMinutes", />= 1/],
  ["wall time as text", (s) => ({ ...s, resources: { ...s.resources, wallMinutes: "2h" } }), "/resources/wallMinutes", /must be integer/],
  ["wall time missing", (s) => ({ ...s, resources: { cores: 1 } }), "/resources/wallMinutes", /is required/],
  ["negative seed", (s) => ({ ...s, seed: "-5" }), "/seed", /unsigned 64-bit/],
  ["seed as a number", (s) => ({ ...s, seed: 12345 }), "/seed", /quote it/],
  ["seed of 2^64", (s) => ({ ...s, seed: "18446744073709551616" }), "/seed", /below 2\^64/],
  ["duplicate scan parameter", (s) => ({ ...s, scan: [{ param: "T", values: [2.2] }, { param: "T", values: [2.3] }] }), "/scan/1/param", /already scanned at \/scan\/0/],
  ["scanned parameter also fixed", (s) => ({ ...s, fixed: { ...s.fixed, T: 2.0 } }), "/scan/0/param", /also given in fixed/],
  ["unknown top-level field", (s) => ({ ...s, replica: 2 }), "/replica", /not a known field/],
  ["unknown retry reason", (s) => ({ ...s, retry: { maxAttempts: 3, on: ["import_rejected"] } }), "/retry/on/0", /must be equal to one of/],
  ["linear axis with equal ends", (s) => ({ ...s, scan: [{ param: "T", linear: { from: 2, to: 2, points: 3 } }] }), "/scan/0/linear", /repeated values/],
  ["log axis through zero", (s) => ({ ...s, scan: [{ param: "T", log: { from: 0, to: 2, points: 3 } }] }), "/scan/0/log/from", /> 0/],
];

describe("malformed specs are refused with the offending field's path", () => {
  for (const [what, mutate, path, message] of CORPUS) {
    it(what, () => {
      const issues = issuesOf(mutate(good()));
      const hit = issues.find((i) => i.path === path);
      expect(hit, `issues: ${JSON.stringify(issues)}`).toBeDefined();
      expect(hit!.message).toMatch(message);
    });
  }

  it("the unmodified spec of the corpus is accepted (so each refusal is due to its one change)", () => {
    expect(parseSpec(good()).scan).toHaveLength(1);
  });

  it("reports every problem of a spec at once, not only the first", () => {
    const paths = issuesOf({ ...good(), replicas: 0, measurements: -1, resources: { cores: 0, wallMinutes: 10 } }).map((i) => i.path);
    expect(paths).toEqual(expect.arrayContaining(["/replicas", "/measurements", "/resources/cores"]));
  });

  it("text that is neither valid JSON nor YAML is refused with its position", () => {
    expect(issuesOf('{ "format": ')[0].message).toMatch(/not valid JSON/);
    expect(issuesOf("name: [\nformat: x\n")[0].message).toMatch(/not valid YAML at line \d+, column \d+/);
    expect(issuesOf("")[0].message).toMatch(/empty/);
    expect(issuesOf("- just\n- a list\n")[0]).toEqual({ path: "/", message: "must be an object (a mapping of spec fields)" });
  });

  it("does not modify the object it is given (defaults go into the returned copy)", () => {
    const input = good();
    const out = parseSpec(input);
    expect(input).not.toHaveProperty("retry");
    expect(out.retry).toEqual({ maxAttempts: 1, on: [], resumeOnWallTime: false });
    expect(out.notify).toEqual({ onFailure: true, onDone: false });
  });
});

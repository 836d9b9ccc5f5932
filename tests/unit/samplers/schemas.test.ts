// The shared parameter schemas and run-input validation (what the app and the samplers both use).
import Ajv2020 from "ajv/dist/2020";
import { describe, expect, it } from "vitest";
import { SAMPLER_CATALOG, SAMPLER_NAMES, runInputSchema } from "@/lib/samplers/schemas";
import { defaultLoggasStep, validateParams, validateRunInput } from "@/lib/samplers/validate";

describe("sampler schemas", () => {
  it("every schema compiles under strict Ajv 2020-12 and the catalogue matches DESIGN.md's table", () => {
    const ajv = new Ajv2020({ strict: true });
    for (const n of SAMPLER_NAMES) expect(() => ajv.compile(SAMPLER_CATALOG[n].paramsSchema)).not.toThrow();
    expect(() => ajv.compile(runInputSchema)).not.toThrow();
    expect(SAMPLER_CATALOG.ising2d.observables.map((o) => o.name)).toEqual(["e", "absM", "m2", "m4"]);
    expect(SAMPLER_CATALOG.oscillator.observables.map((o) => o.name)).toEqual(["x2", "action", "acceptance"]);
    expect(SAMPLER_CATALOG.loggas.observables.map((o) => o.name)).toEqual(["sumSq", "lambdaMax"]);
  });

  it("accepts DESIGN.md's example run.json", () => {
    const r = validateRunInput({
      format: "ergodex.run/1", runId: "3f1c7a1e-9d7b-4c1a-8f67-2d8c3b9e0a11",
      sampler: { name: "ising2d", version: "1.0.0" },
      params: { L: 16, T: 2.3, algorithm: "metropolis" },
      seed: "12345678901234567890", thermalization: 1000, measurements: 10000, interval: 1,
    });
    expect(r.ok).toBe(true);
  });

  it("fills documented defaults", () => {
    expect(validateParams("ising2d", { L: 4, T: 1, algorithm: "metropolis" })).toEqual({
      ok: true, value: { L: 4, T: 1, algorithm: "metropolis", sweep: "sequential", start: "cold" },
    });
    expect(validateParams("ising2d", { L: 4, T: 1, algorithm: "wolff" })).toEqual({
      ok: true, value: { L: 4, T: 1, algorithm: "wolff", start: "cold" },
    });
    expect(validateParams("oscillator", { N: 4, a: 1, m: 1, omega: 1, step: 1 })).toMatchObject({ ok: true, value: { hits: 1 } });
    expect(validateParams("loggas", { N: 10, beta: 2, method: "metropolis" })).toMatchObject({
      ok: true, value: { step: defaultLoggasStep(10, 2) },
    });
  });

  it("rejects out-of-range values with the field and the value", () => {
    expect(validateParams("loggas", { N: 0, beta: 2, method: "tridiagonal" })).toEqual({ ok: false, error: "params.N must be >= 1 (got 0)" });
    expect(validateParams("oscillator", { N: 4, a: 0, m: 1, omega: 1, step: 1 })).toEqual({ ok: false, error: "params.a must be > 0 (got 0)" });
    expect(validateParams("ising2d", { L: 4.5, T: 1, algorithm: "wolff" })).toEqual({ ok: false, error: "params.L must be integer (got 4.5)" });
    expect(validateParams("ising2d", { T: 1, algorithm: "wolff" })).toEqual({ ok: false, error: 'params: missing required field "L"' });
  });
});

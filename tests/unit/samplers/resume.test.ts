// Checkpoint and resume: an interrupted run, started again on the same outdir, must end
// with a series byte-identical to an uninterrupted run (in-process for every sampler,
// and once end-to-end with a real SIGTERM to the CLI process).
import fs from "node:fs";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { driveRun, type StopFlag } from "@/cluster-fake/samplers/driver";
import { BadInputError } from "@/cluster-fake/samplers/errors";
import { validateParams, validateRunInput, type RunInput } from "@/lib/samplers/validate";
import type { SamplerName } from "@/lib/samplers/schemas";
import { runJson, spawnCli, tmpDir, writeRunJson } from "./helpers";

/** A stop flag that trips after `sweeps` sweeps (the driver reads it once before each sweep). */
const stopAfter = (sweeps: number): StopFlag => {
  let reads = 0;
  return {
    get requested() {
      return reads++ >= sweeps;
    },
    set requested(_v: boolean) {},
  };
};

async function drive(sampler: SamplerName, raw: object, outdir: string, stop: StopFlag) {
  const run = validateRunInput(raw);
  if (!run.ok) throw new Error(run.error);
  const params = validateParams(sampler, run.value.params);
  if (!params.ok) throw new Error(params.error);
  fs.mkdirSync(outdir, { recursive: true });
  return driveRun({ run: run.value as RunInput, sampler, params: params.value, outdir, stop });
}

interface Case {
  sampler: SamplerName;
  params: Record<string, unknown>;
  extra: Record<string, unknown>;
  stops: number[];
  files?: string[];
}

const cases = ([
  { sampler: "ising2d", params: { L: 12, T: 2.4, algorithm: "metropolis", sweep: "checkerboard", start: "hot" }, extra: { thermalization: 30, measurements: 40, interval: 3 }, stops: [10, 37], files: ["series.csv"] },
  { sampler: "ising2d", params: { L: 12, T: 2.4, algorithm: "wolff" }, extra: { thermalization: 20, measurements: 30, interval: 1 }, stops: [7, 18] },
  { sampler: "oscillator", params: { N: 16, a: 0.5, m: 1, omega: 1, step: 1, hits: 2 }, extra: { thermalization: 40, measurements: 20, interval: 4 }, stops: [25, 26, 23] },
  { sampler: "loggas", params: { N: 6, beta: 2, method: "metropolis" }, extra: { thermalization: 10, measurements: 30, interval: 2 }, stops: [5, 28], files: ["series.csv", "spectrum.csv"] },
  { sampler: "loggas", params: { N: 6, beta: 1, method: "tridiagonal" }, extra: { thermalization: 0, measurements: 20, interval: 1, encoding: "f64le" }, stops: [3], files: ["series.f64le", "spectrum.csv"] },
] satisfies Case[]).map((c: Case) => ({ ...c, files: c.files ?? ["series.csv"] }));

describe("checkpoint/resume in-process", () => {
  it.each(cases)("$sampler $params.algorithm$params.method: interrupted at $stops sweeps", async (c) => {
    const raw = runJson(c.sampler, c.params, c.extra);
    const dir = tmpDir("resume");
    const ref = path.join(dir, "ref");
    const cut = path.join(dir, "cut");
    expect((await drive(c.sampler, raw, ref, { requested: false })).status).toBe("done");
    let total = 0;
    for (const k of c.stops) {
      total += k;
      const r = await drive(c.sampler, raw, cut, stopAfter(k));
      expect(r).toEqual({ status: "interrupted", sweepsDone: total });
      expect(fs.existsSync(path.join(cut, "checkpoint.json"))).toBe(true);
      expect(JSON.parse(fs.readFileSync(path.join(cut, "progress.json"), "utf8")).sweepsDone).toBe(total);
    }
    const done = await drive(c.sampler, raw, cut, { requested: false });
    expect(done).toMatchObject({ status: "done", resumedFrom: total });
    for (const f of c.files) {
      expect(fs.readFileSync(path.join(cut, f)).equals(fs.readFileSync(path.join(ref, f))), f).toBe(true);
    }
    expect(fs.existsSync(path.join(cut, "checkpoint.json"))).toBe(false);
  });

  it("refuses a checkpoint of another run, and a partial series changed since", async () => {
    const raw = runJson("ising2d", { L: 8, T: 2, algorithm: "metropolis" }, { thermalization: 10, measurements: 50 });
    const out = path.join(tmpDir("foreign"), "out");
    await drive("ising2d", raw, out, stopAfter(30));
    await expect(drive("ising2d", { ...raw, seed: "7" }, out, { requested: false })).rejects.toThrow(BadInputError);
    await expect(drive("ising2d", { ...raw, seed: "7" }, out, { requested: false })).rejects.toThrow(/belongs to a different run/);
    const series = path.join(out, "series.csv");
    const bytes = fs.readFileSync(series);
    bytes[bytes.length - 2] ^= 1;
    fs.writeFileSync(series, bytes);
    await expect(drive("ising2d", raw, out, { requested: false })).rejects.toThrow(/changed since the checkpoint/);
  });
});

describe("SIGTERM to the CLI", () => {
  it("exits 3 with a checkpoint; rerun resumes to a byte-identical series", async () => {
    const raw = runJson("ising2d", { L: 64, T: 2.3, algorithm: "metropolis" }, { thermalization: 1000, measurements: 60_000 });
    const dir = tmpDir("sigterm");
    const runFile = writeRunJson(dir, raw);
    const ref = spawnCli(["ising2d", runFile, path.join(dir, "ref")]);
    const cutDir = path.join(dir, "cut");
    const first = spawnCli(["ising2d", runFile, cutDir]);
    // Wait until progress shows measuring has begun, then terminate.
    const progressFile = path.join(cutDir, "progress.json");
    let seen = 0;
    for (let i = 0; i < 300 && seen <= raw.thermalization; i++) {
      await new Promise((r) => setTimeout(r, 50));
      try {
        seen = JSON.parse(fs.readFileSync(progressFile, "utf8")).sweepsDone;
      } catch {
        // not written yet
      }
    }
    expect(seen).toBeGreaterThan(raw.thermalization);
    first.kill("SIGTERM");
    const r1 = await first.done;
    expect(r1.code, r1.stderr).toBe(3);
    expect(r1.stderr.trimEnd().split("\n")).toHaveLength(1);
    expect(r1.stderr).toMatch(/interrupted by SIGTERM after \d+ sweeps; checkpoint written/);
    const cp = JSON.parse(fs.readFileSync(path.join(cutDir, "checkpoint.json"), "utf8"));
    expect(cp.sweepsDone).toBeGreaterThan(raw.thermalization);
    expect(cp.sweepsDone).toBeLessThan(raw.thermalization + raw.measurements);
    expect(cp.series.rows).toBe(cp.sweepsDone - raw.thermalization);
    const r2 = await spawnCli(["ising2d", runFile, cutDir]).done;
    expect(r2.code, r2.stderr).toBe(0);
    const r0 = await ref.done;
    expect(r0.code, r0.stderr).toBe(0);
    const a = fs.readFileSync(path.join(cutDir, "series.csv"));
    expect(a.equals(fs.readFileSync(path.join(dir, "ref", "series.csv")))).toBe(true);
    expect(a.toString().trimEnd().split("\n")).toHaveLength(raw.measurements + 1);
  });
});

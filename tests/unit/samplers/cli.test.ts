// End-to-end runs of `tsx cluster-fake/samplers/cli.ts <name> <run.json> <outdir>`: the
// bundle contract of DESIGN.md, determinism, and bad-input exit codes.
import crypto from "node:crypto";
import fs from "node:fs";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { SAMPLER_CATALOG } from "@/lib/samplers/schemas";
import { runCli } from "@/cluster-fake/samplers/cli-main";
import { runJson, spawnCli, tmpDir, writeRunJson } from "./helpers";

const sha256 = (file: string) => crypto.createHash("sha256").update(fs.readFileSync(file)).digest("hex");

async function runTo(run: unknown, sampler = "ising2d") {
  const dir = tmpDir("cli");
  const out = path.join(dir, "out");
  const res = await spawnCli([sampler, writeRunJson(dir, run), out]).done;
  return { out, ...res };
}

describe("sampler CLI bundle", () => {
  const isingRun = runJson("ising2d", { L: 8, T: 2.5, algorithm: "metropolis" }, { thermalization: 50, measurements: 300, interval: 3 });

  it("same run.json gives a byte-identical series; another seed gives a different one", async () => {
    const [a, b, c] = await Promise.all([runTo(isingRun), runTo(isingRun), runTo({ ...isingRun, seed: "12345678901234567891" })]);
    for (const r of [a, b, c]) expect(r.code, r.stderr).toBe(0);
    const sa = fs.readFileSync(path.join(a.out, "series.csv"));
    expect(sa.equals(fs.readFileSync(path.join(b.out, "series.csv")))).toBe(true);
    expect(sa.equals(fs.readFileSync(path.join(c.out, "series.csv")))).toBe(false);

    // Manifest exactly per DESIGN.md "Result bundle".
    const m = JSON.parse(fs.readFileSync(path.join(a.out, "manifest.json"), "utf8"));
    expect(Object.keys(m).sort()).toEqual(
      ["exitStatus", "files", "finishedAt", "format", "host", "observables", "params", "runId", "sampler", "seed", "series", "startedAt"].sort(),
    );
    expect(m.format).toBe("ergodex.result/1");
    expect(m.runId).toBe(isingRun.runId);
    expect(m.sampler.name).toBe("ising2d");
    expect(m.sampler.version).toBe(SAMPLER_CATALOG.ising2d.version);
    expect(m.sampler.commit).toMatch(/^sha256:[0-9a-f]{64}$/);
    expect(m.params).toEqual({ ...isingRun.params, sweep: "sequential", start: "cold" }); // defaults recorded
    expect(m.seed).toBe(isingRun.seed);
    expect(Date.parse(m.finishedAt)).toBeGreaterThanOrEqual(Date.parse(m.startedAt));
    expect(m.exitStatus).toBe(0);
    expect(typeof m.host).toBe("string");
    expect(m.observables.map((o: { name: string }) => o.name)).toEqual(["e", "absM", "m2", "m4"]);
    expect(m.series).toEqual({ file: "series.csv", encoding: "csv", rows: 300 });
    expect(m.files.map((f: { path: string }) => f.path).sort()).toEqual(["progress.json", "series.csv"]);
    for (const f of m.files) {
      expect(f.sha256).toBe(sha256(path.join(a.out, f.path)));
      expect(f.bytes).toBe(fs.statSync(path.join(a.out, f.path)).size);
    }
    // Series: header, one row per measurement, measured every `interval` sweeps after thermalization.
    const lines = sa.toString().trimEnd().split("\n");
    expect(lines[0]).toBe("sweep,e,absM,m2,m4");
    expect(lines.length).toBe(301);
    expect(lines.slice(1).map((l) => Number(l.split(",")[0]))).toEqual(Array.from({ length: 300 }, (_, k) => 50 + 3 * (k + 1)));
    const progress = JSON.parse(fs.readFileSync(path.join(a.out, "progress.json"), "utf8"));
    expect(progress).toMatchObject({ sweepsDone: 950, sweepsTotal: 950 });
    expect(fs.existsSync(path.join(a.out, "checkpoint.json"))).toBe(false);
  });

  it("loggas with f64le encoding writes float64 rows and the final spectrum", async () => {
    const N = 9;
    const run = runJson("loggas", { N, beta: 2, method: "metropolis" }, { encoding: "f64le", measurements: 50 });
    const r = await runTo(run, "loggas");
    expect(r.code, r.stderr).toBe(0);
    const m = JSON.parse(fs.readFileSync(path.join(r.out, "manifest.json"), "utf8"));
    expect(m.series).toEqual({ file: "series.f64le", encoding: "f64le", rows: 50 });
    expect(m.files.map((f: { path: string }) => f.path).sort()).toEqual(["progress.json", "series.f64le", "spectrum.csv"]);
    const buf = fs.readFileSync(path.join(r.out, "series.f64le"));
    expect(buf.byteLength).toBe(50 * 3 * 8);
    const row = (k: number) => [0, 1, 2].map((c) => buf.readDoubleLE((k * 3 + c) * 8));
    expect(row(0)[0]).toBe(101);
    expect(row(49)[0]).toBe(150);
    // The last sweep is a measurement sweep, so the spectrum is the state of the last row.
    const spec = fs.readFileSync(path.join(r.out, "spectrum.csv"), "utf8").trimEnd().split("\n");
    expect(spec[0]).toBe("lambda");
    const lam = spec.slice(1).map(Number);
    expect(lam.length).toBe(N);
    expect([...lam].sort((a, b) => a - b)).toEqual(lam);
    const [, sumSq, lambdaMax] = row(49);
    expect(lambdaMax).toBe(lam[N - 1]);
    expect(Math.abs(lam.reduce((s, x) => s + x * x, 0) / N - sumSq)).toBeLessThan(1e-12 * sumSq);
  });
});

describe("sampler CLI bad input: exit 2 and a one-line reason", () => {
  const ok = runJson("ising2d", { L: 8, T: 2.5, algorithm: "metropolis" });
  const cases: { name: string; args?: string[]; sampler?: string; run?: unknown; reason: RegExp }[] = [
    { name: "no arguments", args: [], reason: /usage: sampler <name> <run\.json> <outdir>/ },
    { name: "unknown sampler", sampler: "potts", run: ok, reason: /unknown sampler "potts"/ },
    { name: "missing run.json", args: ["ising2d", "/nonexistent/run.json", "/tmp/x"], reason: /cannot read run\.json .*ENOENT/ },
    { name: "invalid JSON", run: "{ not json", reason: /not valid JSON/ },
    { name: "wrong format", run: { ...ok, format: "ergodex.run/2" }, reason: /run\.json\.format must be "ergodex\.run\/1"/ },
    { name: "missing field", run: { ...ok, measurements: undefined }, reason: /missing required field "measurements"/ },
    { name: "unknown parameter", run: { ...ok, params: { ...ok.params, J: 1 } }, reason: /params: unknown parameter "J"/ },
    { name: "L out of range", run: { ...ok, params: { ...ok.params, L: 1 } }, reason: /params\.L must be >= 2 \(got 1\)/ },
    { name: "T not positive", run: { ...ok, params: { ...ok.params, T: -1 } }, reason: /params\.T must be > 0 \(got -1\)/ },
    { name: "unknown algorithm", run: { ...ok, params: { ...ok.params, algorithm: "heatbath" } }, reason: /params\.algorithm must be one of "metropolis", "wolff"/ },
    { name: "sweep with wolff", run: { ...ok, params: { L: 8, T: 2, algorithm: "wolff", sweep: "checkerboard" } }, reason: /params\.sweep: not allowed with algorithm "wolff"/ },
    { name: "clusters with metropolis", run: { ...ok, params: { ...ok.params, clusters: 4 } }, reason: /params\.clusters: only allowed with algorithm "wolff"/ },
    { name: "seed above 2^64-1", run: { ...ok, seed: "18446744073709551616" }, reason: /seed must be below 2\^64/ },
    { name: "non-numeric seed", run: { ...ok, seed: 42 }, reason: /run\.json\.seed must be string/ },
    { name: "sampler mismatch", sampler: "oscillator", run: ok, reason: /sampler\.name is "ising2d" but the command runs "oscillator"/ },
    { name: "version mismatch", run: { ...ok, sampler: { name: "ising2d", version: "9.9.9" } }, reason: /asks for ising2d 9\.9\.9/ },
    { name: "step with tridiagonal", sampler: "loggas", run: runJson("loggas", { N: 4, beta: 2, method: "tridiagonal", step: 0.1 }), reason: /params\.step: not allowed with method "tridiagonal"/ },
    { name: "oscillator hits 0", sampler: "oscillator", run: runJson("oscillator", { N: 4, a: 1, m: 1, omega: 1, step: 1, hits: 0 }), reason: /params\.hits must be >= 1/ },
  ];

  const argsOf = (c: (typeof cases)[number]) => {
    const dir = tmpDir("bad");
    return c.args ?? [c.sampler ?? "ising2d", writeRunJson(dir, c.run), path.join(dir, "out")];
  };

  // In-process through the same function the process wrapper calls (fast).
  it.each(cases)("$name", async (c) => {
    const { code, message } = await runCli(argsOf(c));
    expect(code, message).toBe(2);
    expect(message).not.toContain("\n");
    expect(message).toMatch(c.reason);
  });

  // A few through a real process: exit status and exactly one stderr line.
  it("as a process: exit code 2 and one stderr line", async () => {
    const picked = cases.filter((c) => ["no arguments", "invalid JSON", "unknown parameter", "L out of range"].includes(c.name));
    const results = await Promise.all(picked.map(async (c) => ({ c, ...(await spawnCli(argsOf(c)).done) })));
    for (const { c, code, stderr } of results) {
      expect(code, `${c.name}: ${stderr}`).toBe(2);
      expect(stderr.trimEnd().split("\n").length, `${c.name}: ${stderr}`).toBe(1);
      expect(stderr, c.name).toMatch(new RegExp("^sampler: .*" + c.reason.source));
    }
  });
});

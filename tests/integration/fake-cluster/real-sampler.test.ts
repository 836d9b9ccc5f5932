import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { createHash } from "node:crypto";
import { spawn } from "node:child_process";
import { afterAll, describe, expect, it } from "vitest";
import type { FakeCluster } from "@/cluster-fake/server/server";
import { DEFAULT_SAMPLER_COMMAND, DEFAULT_SAMPLER_ENV } from "@/cluster-fake/server/config";
import type { FakeClusterAdapter } from "@/broker/adapters/fake-cluster-adapter";
import { RES, TERMINAL, adapterFor, makeStateDir, startNode, waitForStatus } from "./harness";

const sha256 = (file: string) => createHash("sha256").update(fs.readFileSync(file)).digest("hex");

/** The same CLI, run directly (no cluster, no interruption): the reference output. */
function runLocally(runJsonPath: string, outDir: string): Promise<number | null> {
  const [cmd, ...args] = DEFAULT_SAMPLER_COMMAND.map((a) =>
    a.replace("{sampler}", "ising2d").replace("{runJson}", runJsonPath).replace("{outDir}", outDir));
  const child = spawn(cmd, args, { env: { ...process.env, ...DEFAULT_SAMPLER_ENV }, stdio: "ignore" });
  return new Promise((r) => child.once("exit", (code) => r(code)));
}

describe("the real ising2d sampler through the fake cluster", () => {
  const dir = makeStateDir();
  const tmp = fs.mkdtempSync(path.join(os.tmpdir(), "ergodex-real-"));
  let node: FakeCluster | undefined;
  let adapter: FakeClusterAdapter | undefined;
  afterAll(async () => {
    await adapter?.close();
    await node?.close();
    dir.cleanup();
    fs.rmSync(tmp, { recursive: true, force: true });
  });

  it("is cut at its wall time, resumes on resubmit, and ends bit for bit like an uninterrupted run", async () => {
    // Default sampler command: the real samplers CLI.
    node = await startNode(dir.stateDir, { samplerCommand: [...DEFAULT_SAMPLER_COMMAND], killGraceMs: 3000 });
    const a = adapterFor(node, dir.clientKey);
    adapter = a;
    // 200k sweeps of L=32 take about 2.5 s of compute here (3–5 s under load), after ~0.5 s of
    // start-up; a 1.5 s limit therefore lands mid-run with room on both sides.
    const run = {
      format: "ergodex.run/1", runId: "ising-real", sampler: { name: "ising2d", version: "1.0.0" },
      params: { L: 32, T: 2.3, algorithm: "metropolis" }, seed: "12345678901234567890",
      thermalization: 2000, measurements: 2000, interval: 99,
    };
    const refJson = path.join(tmp, "run.json");
    fs.writeFileSync(refJson, JSON.stringify(run));
    const reference = runLocally(refJson, path.join(tmp, "ref"));

    await a.stage([{ runId: run.runId, runJson: run }]);
    await a.submit([{ runId: run.runId, dispatchToken: "ising-1", resources: { ...RES, wallSeconds: 1.5 } }]);
    const [cut] = await waitForStatus(a, [run.runId], ([s]) => TERMINAL.has(s.state), 30_000);
    expect(cut, cut.stderrTail).toMatchObject({ state: "timed_out", exitCode: 3, checkpointed: true });
    expect(cut.stderrTail).toMatch(/checkpoint written/);
    expect(cut.progress!.sweepsDone).toBeLessThan(200_000);
    // The checkpoint sits in the run's outdir on the node, where the resubmitted run will look.
    expect(fs.existsSync(path.join(dir.stateDir, "work", run.runId, "out", "checkpoint.json"))).toBe(true);

    await a.submit([{ runId: run.runId, dispatchToken: "ising-2", resources: RES }]);
    const [end] = await waitForStatus(a, [run.runId], ([s]) => s.attempt === 2 && TERMINAL.has(s.state), 30_000);
    expect(end, end.stderrTail).toMatchObject({ state: "exited", exitCode: 0, failure: null });
    expect(end.progress).toMatchObject({ sweepsDone: 200_000, sweepsTotal: 200_000 });

    const local = path.join(tmp, "fetched");
    const files = await a.fetch(run.runId, local);
    const manifest = JSON.parse(fs.readFileSync(path.join(local, "manifest.json"), "utf8"));
    expect(manifest).toMatchObject({ format: "ergodex.result/1", runId: run.runId, series: { rows: 2000 } });
    // Every file the manifest lists arrived intact.
    for (const f of manifest.files as { path: string; sha256: string; bytes: number }[]) {
      expect(files.find((x) => x.path === f.path)?.bytes, f.path).toBe(f.bytes);
      expect(sha256(path.join(local, f.path)), f.path).toBe(f.sha256);
    }
    const csv = fs.readFileSync(path.join(local, manifest.series.file), "utf8").trim().split("\n");
    expect(csv[0]).toBe("sweep,e,absM,m2,m4");
    expect(csv.length).toBe(2001);
    // Exact bound: two bonds per site, each contributing ±1, so |e| ≤ 2.
    expect(csv.slice(1).every((row) => Math.abs(Number(row.split(",")[1])) <= 2)).toBe(true);

    // Cut + resume gives the same chain as running straight through.
    expect(await reference).toBe(0);
    expect(sha256(path.join(local, manifest.series.file))).toBe(sha256(path.join(tmp, "ref", manifest.series.file)));
  });
});

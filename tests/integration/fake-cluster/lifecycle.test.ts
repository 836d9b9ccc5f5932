import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { FakeCluster } from "@/cluster-fake/server/server";
import type { FakeClusterAdapter } from "@/broker/adapters/fake-cluster-adapter";
import { RES, TERMINAL, adapterFor, makeStateDir, runJson, startNode, waitForStatus } from "./harness";

describe("fake cluster over SSH: stage, submit, status, fetch", () => {
  let dir: ReturnType<typeof makeStateDir>;
  let node: FakeCluster;
  let adapter: FakeClusterAdapter;
  const local = fs.mkdtempSync(path.join(os.tmpdir(), "ergodex-fetch-"));

  beforeAll(async () => {
    dir = makeStateDir();
    node = await startNode(dir.stateDir);
    adapter = adapterFor(node, dir.clientKey);
  });
  afterAll(async () => {
    await adapter?.close();
    await node?.close();
    dir?.cleanup();
    fs.rmSync(local, { recursive: true, force: true });
  });

  it("reports health over exec", async () => {
    const h = await adapter.health();
    expect(h).toMatchObject({ ok: true, protocol: "ergodex-node/1", slots: 2, running: 0, queued: 0 });
  });

  it("runs a staged run to the end and brings its bundle home", async () => {
    const run = runJson("run-a", { sweepMs: 15 }, { thermalization: 5, measurements: 30 });
    await adapter.stage([{ runId: "run-a", runJson: run }]);
    const staged = JSON.parse(fs.readFileSync(path.join(dir.stateDir, "work", "run-a", "run.json"), "utf8"));
    expect(staged).toEqual(run);

    const [sub] = await adapter.submit([{ runId: "run-a", dispatchToken: "tok-1", resources: RES }]);
    expect(sub).toMatchObject({ runId: "run-a", accepted: true, alreadySubmitted: false });

    // While it runs, progress comes through the status call.
    const mid = await waitForStatus(adapter, ["run-a"], ([s]) => s.state === "running" && (s.progress?.sweepsDone ?? 0) > 0);
    expect(mid[0].progress!.sweepsTotal).toBe(35);

    const [end] = await waitForStatus(adapter, ["run-a"], ([s]) => TERMINAL.has(s.state));
    expect(end).toMatchObject({ state: "exited", exitCode: 0, failure: null, dispatchToken: "tok-1", attempt: 1 });
    expect(end.jobId).toBe(sub.accepted ? sub.jobId : null);
    expect(end.progress).toMatchObject({ sweepsDone: 35, sweepsTotal: 35 });
    expect(Date.parse(end.finishedAt!)).toBeGreaterThanOrEqual(Date.parse(end.startedAt!));

    const files = await adapter.fetch("run-a", local);
    expect(files.map((f) => f.path)).toEqual(["attempts.log", "manifest.json", "progress.json", "series.csv"]);
    const manifest = JSON.parse(fs.readFileSync(path.join(local, "manifest.json"), "utf8"));
    expect(manifest).toMatchObject({ format: "ergodex.result/1", runId: "run-a", series: { rows: 30 } });
    const csv = fs.readFileSync(path.join(local, "series.csv"), "utf8").trim().split("\n");
    expect(csv[0]).toBe("sweep,x");
    expect(csv.length).toBe(31);
    for (const f of files) expect(f.bytes).toBe(fs.statSync(path.join(dir.stateDir, "work", "run-a", "out", f.path)).size);
  });

  it("treats a resubmit with the same token as a no-op that returns the existing record", async () => {
    const before = (await adapter.status(["run-a"]))[0];
    const [again] = await adapter.submit([{ runId: "run-a", dispatchToken: "tok-1", resources: RES }]);
    expect(again).toMatchObject({ accepted: true, alreadySubmitted: true, jobId: before.jobId, state: "exited" });
    const after = (await adapter.status(["run-a"]))[0];
    expect(after.attempt).toBe(1);
    // The sampler did not start a second time.
    const log = fs.readFileSync(path.join(dir.stateDir, "work", "run-a", "out", "attempts.log"), "utf8");
    expect(log.trim().split("\n")).toEqual(["start 0"]);
  });

  it("refuses a run that was never staged, and a new token while a run is active", async () => {
    await adapter.stage([{ runId: "run-b", runJson: runJson("run-b", { sweepMs: 30 }) }]);
    const res = await adapter.submit([
      { runId: "never-staged", dispatchToken: "t", resources: RES },
      { runId: "run-b", dispatchToken: "tok-b1", resources: RES },
    ]);
    expect(res[0]).toMatchObject({ accepted: false, error: { code: "not_staged" } });
    expect(res[1]).toMatchObject({ accepted: true });
    const [clash] = await adapter.submit([{ runId: "run-b", dispatchToken: "tok-b2", resources: RES }]);
    expect(clash).toMatchObject({ accepted: false, error: { code: "conflict" } });
    await waitForStatus(adapter, ["run-b"], ([s]) => TERMINAL.has(s.state));
  });

  it("reports an unknown run id as unknown, and lists only active runs without ids", async () => {
    const [s] = await adapter.status(["no-such-run"]);
    expect(s).toMatchObject({ state: "unknown", failure: { reason: "unknown_to_cluster" } });
    expect(await adapter.status()).toEqual([]);
  });

  it("carries a failing sampler's exit code and stderr tail into the failure", async () => {
    await adapter.stage([{ runId: "run-fail", runJson: runJson("run-fail", { failAt: 4, failCode: 7 }) }]);
    await adapter.submit([{ runId: "run-fail", dispatchToken: "tf", resources: RES }]);
    const [s] = await waitForStatus(adapter, ["run-fail"], ([x]) => TERMINAL.has(x.state));
    expect(s).toMatchObject({ state: "exited", exitCode: 7, checkpointed: false });
    expect(s.failure?.reason).toBe("nonzero_exit");
    expect(s.failure?.detail).toContain("failing on purpose at sweep 4");
  });

  it("counts round trips: one exec per status call regardless of the number of runs", async () => {
    const before = adapter.connection.roundTrips;
    await adapter.status(["run-a", "run-b", "run-fail", "no-such-run"]);
    expect(adapter.connection.roundTrips - before).toBe(1);
    // Everything so far went over one connection and one SFTP session.
    expect(adapter.connection.stats.connects).toBe(1);
    expect(node.stats.sftpSessions).toBe(1);
  });
});

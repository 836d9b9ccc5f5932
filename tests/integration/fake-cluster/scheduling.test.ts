import fs from "node:fs";
import path from "node:path";
import { afterEach, describe, expect, it } from "vitest";
import type { FakeCluster } from "@/cluster-fake/server/server";
import type { FakeClusterAdapter } from "@/broker/adapters/fake-cluster-adapter";
import { ExecTimeoutError } from "@/broker/adapters/errors";
import { RES, TERMINAL, adapterFor, byId, makeStateDir, runJson, startNode, waitForStatus } from "./harness";

describe("fake cluster scheduling: slots, FIFO, wall time, cancel", () => {
  let dir: ReturnType<typeof makeStateDir> | undefined;
  let node: FakeCluster | undefined;
  let adapter: FakeClusterAdapter | undefined;

  async function setup(slots: number, samplerCommand?: string[]) {
    dir = makeStateDir();
    node = await startNode(dir.stateDir, { slots, killGraceMs: 500, ...(samplerCommand ? { samplerCommand } : {}) });
    adapter = adapterFor(node, dir.clientKey);
    return { d: dir, n: node, a: adapter };
  }
  afterEach(async () => {
    await adapter?.close();
    await node?.close();
    dir?.cleanup();
  });

  it("never runs more than the slot limit and starts queued runs first-in first-out", async () => {
    const { n, a } = await setup(2);
    // Planned order with 25 ms sweeps: A (8) and B (60) start; A ends, C (8) takes its slot;
    // C ends, D (8) takes that slot while B is still running.
    const sweeps = { A: 8, B: 60, C: 8, D: 8 };
    const ids = Object.keys(sweeps);
    await a.stage(ids.map((id) => ({
      runId: id, runJson: runJson(id, { sweepMs: 25 }, { thermalization: 0, measurements: sweeps[id as keyof typeof sweeps] }),
    })));
    const sub = await a.submit(ids.map((id) => ({ runId: id, dispatchToken: `t-${id}`, resources: RES })));
    expect(sub.map((s) => s.accepted && s.state)).toEqual(["running", "running", "queued", "queued"]);

    let maxRunning = 0;
    const final = await waitForStatus(a, ids, (list) => {
      maxRunning = Math.max(maxRunning, list.filter((s) => s.state === "running").length);
      return list.every((s) => TERMINAL.has(s.state));
    });
    const s = byId(final);
    const t = (id: string, k: "startedAt" | "finishedAt") => Date.parse(s.get(id)![k]!);
    expect(final.every((x) => x.state === "exited" && x.exitCode === 0)).toBe(true);
    expect(maxRunning).toBeLessThanOrEqual(2);
    expect(n.scheduler.peakRunning).toBe(2);
    expect(t("C", "startedAt")).toBeGreaterThanOrEqual(t("A", "finishedAt"));
    expect(t("D", "startedAt")).toBeGreaterThanOrEqual(t("C", "finishedAt"));
    expect(t("D", "startedAt")).toBeLessThan(t("B", "finishedAt"));
    // Overlap of the recorded [startedAt, finishedAt] intervals never exceeds the two slots.
    const overlap = (at: number) => ids.filter((id) => t(id, "startedAt") <= at && at < t(id, "finishedAt")).length;
    expect(Math.max(...ids.map((id) => overlap(t(id, "startedAt"))))).toBe(2);
  });

  it("stops a run at its wall time with SIGTERM, and a resubmit with a new token resumes from the checkpoint", async () => {
    const { d, a } = await setup(2);
    // 100 sweeps at 25 ms need ~2.5 s; the 1 s limit leaves node start-up (and its SIGTERM
    // handler) well inside it even on a busy machine.
    await a.stage([{ runId: "long", runJson: runJson("long", { sweepMs: 25 }, { thermalization: 10, measurements: 90 }) }]);
    await a.submit([{ runId: "long", dispatchToken: "try-1", resources: { ...RES, wallSeconds: 1 } }]);
    const [cut] = await waitForStatus(a, ["long"], ([x]) => TERMINAL.has(x.state));
    expect(cut).toMatchObject({ state: "timed_out", exitCode: 3, checkpointed: true, failure: { reason: "wall_time_exceeded" } });
    expect(cut.stderrTail).toContain("checkpoint written");
    const doneAtCut = cut.progress!.sweepsDone;
    expect(doneAtCut).toBeGreaterThan(0);
    expect(doneAtCut).toBeLessThan(100);

    const [re] = await a.submit([{ runId: "long", dispatchToken: "try-2", resources: RES }]);
    expect(re).toMatchObject({ accepted: true, alreadySubmitted: false });
    const [end] = await waitForStatus(a, ["long"], ([x]) => x.attempt === 2 && TERMINAL.has(x.state));
    expect(end).toMatchObject({ state: "exited", exitCode: 0, dispatchToken: "try-2", progress: { sweepsDone: 100 } });
    expect(end.jobId).not.toBe(cut.jobId);
    // Same outdir: the second start picked up where the checkpoint left off.
    const log = fs.readFileSync(path.join(d.stateDir, "work", "long", "out", "attempts.log"), "utf8");
    expect(log.trim().split("\n")).toEqual(["start 0", `start ${doneAtCut}`]);
  });

  it("kills a sampler that ignores SIGTERM once the grace period is over", async () => {
    const { a } = await setup(1);
    await a.stage([{ runId: "stubborn", runJson: runJson("stubborn", { sweepMs: 25, ignoreSigterm: true }, { thermalization: 0, measurements: 400 }) }]);
    await a.submit([{ runId: "stubborn", dispatchToken: "t", resources: { ...RES, wallSeconds: 1 } }]);
    const [s] = await waitForStatus(a, ["stubborn"], ([x]) => TERMINAL.has(x.state));
    expect(s).toMatchObject({ state: "timed_out", signal: "SIGKILL", exitCode: null, checkpointed: false });
    expect(s.progress!.sweepsDone).toBeLessThan(400);
  });

  it("gives up on a remote command that does not answer in time, without breaking the connection", async () => {
    const { a } = await setup(1);
    await a.stage([{ runId: "deaf", runJson: runJson("deaf", { sweepMs: 25, ignoreSigterm: true }, { thermalization: 0, measurements: 400 }) }]);
    await a.submit([{ runId: "deaf", dispatchToken: "t", resources: RES }]);
    await waitForStatus(a, ["deaf"], ([x]) => (x.progress?.sweepsDone ?? 0) > 0);
    // cancel waits for the process, which ignores SIGTERM and dies only at SIGKILL after 500 ms.
    const err = await a.connection.execJson("ergodex-node cancel deaf", { timeoutMs: 100 }).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(ExecTimeoutError);
    const [s] = await waitForStatus(a, ["deaf"], ([x]) => TERMINAL.has(x.state));
    expect(s).toMatchObject({ state: "cancelled", signal: "SIGKILL" });
    expect(a.connection.stats.connects).toBe(1);
  });

  it("reports a sampler command that cannot be started as launch_failed and moves on", async () => {
    const { a } = await setup(1, ["/nonexistent/sampler-binary", "{runJson}"]);
    await a.stage(["x1", "x2"].map((id) => ({ runId: id, runJson: runJson(id) })));
    await a.submit(["x1", "x2"].map((id) => ({ runId: id, dispatchToken: "t", resources: RES })));
    const list = await waitForStatus(a, ["x1", "x2"], (l) => l.every((x) => TERMINAL.has(x.state)));
    for (const x of list) {
      expect(x).toMatchObject({ state: "exited", exitCode: null, signal: null, failure: { reason: "launch_failed" } });
      expect(x.failure!.detail).toMatch(/ENOENT/);
    }
  });

  it("cancels a queued run (it never starts) and a running one (terminated, slot freed)", async () => {
    const { a } = await setup(1);
    const ids = ["busy", "waiting", "after"];
    await a.stage(ids.map((id) => ({ runId: id, runJson: runJson(id, { sweepMs: 25 }, { thermalization: 0, measurements: 200 }) })));
    await a.submit(ids.slice(0, 2).map((id) => ({ runId: id, dispatchToken: `t-${id}`, resources: RES })));
    await waitForStatus(a, ["busy"], ([x]) => (x.progress?.sweepsDone ?? 0) > 0);

    const [w] = await a.cancel(["waiting"]);
    expect(w).toMatchObject({ state: "cancelled", startedAt: null, failure: null });
    const [b] = await a.cancel(["busy"]);
    // cancel answers once the process is gone: the sampler's own SIGTERM exit code is there.
    expect(b).toMatchObject({ state: "cancelled", exitCode: 3, failure: null });
    expect(b.progress!.sweepsDone).toBeLessThan(200);

    // The freed slot goes to the next submission, and "waiting" stays cancelled.
    await a.submit([{ runId: "after", dispatchToken: "t-after", resources: RES }]);
    const st = byId(await waitForStatus(a, ids, (l) => byId(l).get("after")!.state === "running"));
    expect(st.get("waiting")!.state).toBe("cancelled");
    const [again] = await a.cancel(["waiting"]);
    expect(again.state).toBe("cancelled");
    await a.cancel(["after"]);
  });
});

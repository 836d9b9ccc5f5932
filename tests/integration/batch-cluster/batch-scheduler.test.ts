import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { createHash, randomUUID } from "node:crypto";
import { spawn } from "node:child_process";
import ssh2 from "ssh2";
import { afterAll, describe, expect, it } from "vitest";
import { ClusterAuthError, HostKeyMismatchError } from "@/broker/adapters/errors";
import { sshKeyFingerprint } from "@/broker/adapters/host-key-fingerprint";
import type { BatchSchedulerAdapter } from "@/broker/adapters/batch-adapter";
import { batchAdapter, isingRun, startBatchCluster, stopBatchCluster, waitTerminal, type BatchConnection } from "./harness";

// The real scheduler from Debian's packages plus an OpenSSH login node, on 127.0.0.1.
const started = startBatchCluster();
const conn: BatchConnection | null = "conn" in started ? started.conn : null;
if (!conn) console.warn(`batch-scheduler suite skipped: ${"skip" in started ? started.skip : ""}`);

const ROOT = path.resolve(import.meta.dirname, "../../..");
const sha256 = (b: Buffer | string) => createHash("sha256").update(b).digest("hex");
const RES = { cores: 1, wallSeconds: 300, memoryMb: 256 };
const tmp = fs.mkdtempSync(path.join(os.tmpdir(), "ergodex-batch-"));

async function remoteText(a: BatchSchedulerAdapter, file: string): Promise<string> {
  return (await a.connection.sftp<Buffer>((s, cb) => s.readFile(file, cb))).toString("utf8");
}

async function remoteSh(a: BatchSchedulerAdapter, cmd: string): Promise<string> {
  return (await a.connection.exec(cmd)).stdout;
}

describe.skipIf(!conn)("batch scheduler over SSH (real scheduler on loopback)", () => {
  const c = conn!;
  const adapters: BatchSchedulerAdapter[] = [];
  const open = (o: Parameters<typeof batchAdapter>[1] = {}) => {
    const a = batchAdapter(c, o);
    adapters.push(a);
    return a;
  };
  afterAll(async () => {
    await Promise.all(adapters.map((a) => a.close()));
    stopBatchCluster();
    fs.rmSync(tmp, { recursive: true, force: true });
    fs.rmSync(c.workRoot, { recursive: true, force: true }); // the staged runs of this suite (same machine)
  });

  it("refuses a login node whose host key is not the pinned one, before sending anything", async () => {
    const other = ssh2.utils.generateKeyPairSync("ed25519");
    const a = open({ hostKeyFingerprint: sshKeyFingerprint(other.public) });
    await expect(a.status([randomUUID()])).rejects.toBeInstanceOf(HostKeyMismatchError);
    expect(a.connection.stats).toMatchObject({ connects: 0, execCalls: 0, sftpOps: 0 });
    expect(a.schedulerCalls.squeue).toBe(0);
    // And a key that is not in authorized_keys is refused by sshd (public-key auth only).
    const b = open({ privateKey: other.private });
    await expect(b.status([randomUUID()])).rejects.toBeInstanceOf(ClusterAuthError);
  });

  it("runs three ising2d chains as one job array and brings home bundles whose sha256 match their manifests", async () => {
    const a = open({ prelude: 'echo "prelude: run $ERGODEX_RUN_ID task $SLURM_ARRAY_TASK_ID"' });
    const ids = [randomUUID(), randomUUID(), randomUUID()];
    const t0 = Date.now();
    await a.stage(ids.map((id, i) => ({ runId: id, runJson: isingRun(id, { seed: String(100 + i) }) })));
    const sub = await a.submit(ids.map((id) => ({ runId: id, dispatchToken: randomUUID(), resources: RES })));
    expect(sub.every((s) => s.accepted && !s.alreadySubmitted)).toBe(true);
    // One array: one sbatch, task ids <array>_0.._2 in request order.
    expect(a.schedulerCalls.sbatch).toBe(1);
    const arrayId = (sub[0] as { jobId: string }).jobId.split("_")[0];
    expect(sub.map((s) => (s as { jobId: string }).jobId)).toEqual([0, 1, 2].map((i) => `${arrayId}_${i}`));

    const done = await waitTerminal(a, ids, 90_000);
    for (const s of done) expect(s, s.stderrTail).toMatchObject({ state: "exited", exitCode: 0, failure: null, checkpointed: false });
    expect(await a.health()).toMatchObject({ ok: true, slots: c.cpus, running: 0, queued: 0 });
    expect(done.map((s) => s.jobId)).toEqual(sub.map((s) => (s as { jobId: string }).jobId));
    expect(done.every((s) => s.progress?.sweepsDone === 700 && s.progress.sweepsTotal === 700)).toBe(true);
    // Good citizenship: never more than one job listing per query interval (1 s here).
    expect(a.schedulerCalls.squeue).toBeLessThanOrEqual(Math.floor((Date.now() - t0) / 1000) + 1);

    const root = await a.workRoot();
    for (const [i, id] of ids.entries()) {
      const local = path.join(tmp, id);
      const files = await a.fetch(id, local);
      const manifest = JSON.parse(fs.readFileSync(path.join(local, "manifest.json"), "utf8"));
      expect(manifest).toMatchObject({ format: "ergodex.result/1", runId: id, seed: String(100 + i), exitStatus: 0 });
      for (const f of manifest.files as { path: string; sha256: string; bytes: number }[]) {
        const body = fs.readFileSync(path.join(local, f.path));
        expect({ path: f.path, sha256: sha256(body), bytes: body.length }).toEqual(f);
        expect(files.map((x) => x.path)).toContain(f.path);
      }
      expect(fs.readFileSync(path.join(local, "series.csv"), "utf8").trimEnd().split("\n")).toHaveLength(1 + 500);
      // The task's environment named its run, and the cluster's prelude ran in it.
      const dir = path.posix.join(root, ".ergodex-arrays");
      const group = (await remoteSh(a, `ls ${dir}`)).split("\n").filter(Boolean);
      const outs = await Promise.all(group.map((g) => remoteText(a, `${dir}/${g}/${i}.out`).catch(() => "")));
      expect(outs).toContain(`prelude: run ${id} task ${i}\n`);
    }
  }, 150_000);

  it("reports a sampler that rejects its run.json as failed with exit code 2 and its stderr", async () => {
    const a = open();
    const id = randomUUID();
    const run = isingRun(id);
    await a.stage([{ runId: id, runJson: { ...run, params: { ...run.params, bogus: 1 } } }]);
    await a.submit([{ runId: id, dispatchToken: randomUUID(), resources: RES }]);
    const [s] = await waitTerminal(a, [id], 60_000);
    expect(s).toMatchObject({ state: "exited", exitCode: 2, checkpointed: false, failure: { reason: "nonzero_exit" } });
    expect(s.stderrTail).toMatch(/^sampler: .*bogus/m);
    expect(s.failure!.detail).toMatch(/^exit code 2: sampler: /);
  }, 90_000);

  it("puts runs with different resources into separate arrays, one sbatch each", async () => {
    const a = open();
    const ids = [randomUUID(), randomUUID(), randomUUID()];
    await a.stage(ids.map((id) => ({ runId: id, runJson: isingRun(id) })));
    const sub = await a.submit(ids.map((id, i) => ({ runId: id, dispatchToken: randomUUID(), resources: { ...RES, memoryMb: i === 1 ? 512 : 256 } })));
    const arrays = sub.map((s) => (s as { jobId: string }).jobId.split("_")[0]);
    expect(a.schedulerCalls.sbatch).toBe(2);
    expect(arrays[0]).toBe(arrays[2]);
    expect(arrays[1]).not.toBe(arrays[0]);
    const done = await waitTerminal(a, ids, 60_000);
    expect(done.map((s) => s.state)).toEqual(["exited", "exited", "exited"]);
  }, 90_000);

  it("after a broker crash, the same runs under the same tokens are found by job name and not submitted twice", async () => {
    const ids = [randomUUID(), randomUUID(), randomUUID()];
    const tokens = ids.map(() => randomUUID());
    const first = open();
    await first.stage(ids.map((id) => ({ runId: id, runJson: isingRun(id, { measurements: 2000 }) })));
    const before = await first.submit(ids.slice(0, 2).map((id, i) => ({ runId: id, dispatchToken: tokens[i], resources: RES })));
    await first.close(); // the crash: everything the adapter knew in memory is gone

    const again = open();
    const after = await again.submit(ids.map((id, i) => ({ runId: id, dispatchToken: tokens[i], resources: RES })));
    expect(after.slice(0, 2)).toEqual(before.map((b) => ({ ...b, alreadySubmitted: true, state: expect.any(String) })));
    expect(after[2]).toMatchObject({ accepted: true, alreadySubmitted: false });
    expect(again.schedulerCalls.sbatch).toBe(1); // only the run that was never submitted

    const done = await waitTerminal(again, ids, 90_000);
    expect(done.map((s) => [s.state, s.exitCode, s.attempt])).toEqual(ids.map(() => ["exited", 0, 1]));
    // Each run was started exactly once: one task marker per run folder.
    const root = await again.workRoot();
    for (const id of ids) expect((await remoteSh(again, `ls ${root}/${id}/.ergodex`)).match(/\.started$/gm)).toHaveLength(1);
    // The same token again once the run has finished is still a no-op.
    const resub = await again.submit([{ runId: ids[0], dispatchToken: tokens[0], resources: RES }]);
    expect(resub[0]).toMatchObject({ accepted: true, alreadySubmitted: true });
  }, 150_000);

  it("cancels queued and running tasks, leaving no jobs in the scheduler and no sampler processes", async () => {
    const a = open();
    // More runs than the node has cores (start.sh gives it the machine's cores): some wait.
    const ids = Array.from({ length: c.cpus + 1 }, () => randomUUID());
    await a.stage(ids.map((id) => ({ runId: id, runJson: isingRun(id, { L: 32, thermalization: 1000, measurements: 3000, interval: 1000 }) })));
    await a.submit(ids.map((id) => ({ runId: id, dispatchToken: randomUUID(), resources: RES })));
    for (let i = 0; i < 120; i++) {
      const s = await a.status(ids);
      if (s.some((x) => x.state === "running" && x.progress)) break;
      await new Promise((r) => setTimeout(r, 500));
    }
    const states = new Set((await a.status(ids)).map((s) => s.state));
    expect(states.has("running")).toBe(true);
    const out = await a.cancel(ids);
    expect(out.map((s) => [s.state, s.failure])).toEqual(ids.map(() => ["cancelled", null]));
    let left = "";
    for (let i = 0; i < 60; i++) {
      left = (await remoteSh(a, `squeue --noheader --user=${c.user} --states=PENDING,RUNNING,COMPLETING,SUSPENDED --format=%i`)).trim();
      if (left === "") break;
      await new Promise((r) => setTimeout(r, 500));
    }
    expect(left).toBe("");
    // Once wound down, the scheduler's own listing says CANCELLED too.
    await new Promise((r) => setTimeout(r, 1100));
    expect((await a.status(ids)).map((s) => s.state)).toEqual(ids.map(() => "cancelled"));
    const procs = (await remoteSh(a, "ps -u $(id -u) -o args=")).split("\n").filter((l) => ids.some((id) => l.includes(id)));
    expect(procs).toEqual([]);
  }, 120_000);

  it("stops a run at its wall time with a checkpoint; the resubmission resumes to a byte-identical series", async () => {
    // The scheduler's unit is the minute and its controller looks at time limits every 30 s. A
    // 1-minute limit with the warning signal 55 s ahead (sbatch --signal=B:TERM@55) makes the
    // sampler get its SIGTERM 5–35 s after start: a real wall-time stop that the test can afford.
    const a = open({ wallSignalSeconds: 55 });
    const id = randomUUID();
    // ~3M sweeps of L=32 (about 45 s of one core here): longer than the warning can take to come.
    const run = isingRun(id, { L: 32, thermalization: 1000, measurements: 3000, interval: 1000, seed: "987654321" });
    fs.writeFileSync(path.join(tmp, "wall.json"), JSON.stringify(run));
    const reference = new Promise<number | null>((resolve) => {
      const child = spawn(process.execPath, ["--import", path.join(ROOT, "node_modules/tsx/dist/loader.mjs"),
        path.join(ROOT, "cluster-fake/samplers/cli.ts"), "ising2d", path.join(tmp, "wall.json"), path.join(tmp, "wall-ref")], { stdio: "ignore" });
      child.once("exit", (code) => resolve(code));
    });
    await a.stage([{ runId: id, runJson: run }]);
    await a.submit([{ runId: id, dispatchToken: randomUUID(), resources: { ...RES, wallSeconds: 60 } }]);
    const [cut] = await waitTerminal(a, [id], 150_000);
    expect(cut, `expected a wall-time stop, got ${cut.state} (${cut.failure?.detail})`).toMatchObject({
      state: "timed_out", exitCode: 3, checkpointed: true, failure: { reason: "wall_time_exceeded" },
    });
    expect(cut.progress!.sweepsDone).toBeLessThan(cut.progress!.sweepsTotal);
    const root = await a.workRoot();
    expect(JSON.parse(await remoteText(a, `${root}/${id}/out/checkpoint.json`))).toBeTruthy();

    // The broker's resubmission: a new dispatch token, same run folder, so the sampler resumes.
    const [re] = await a.submit([{ runId: id, dispatchToken: randomUUID(), resources: RES }]);
    expect(re).toMatchObject({ accepted: true, alreadySubmitted: false });
    const [end] = await waitTerminal(a, [id], 150_000);
    expect(end).toMatchObject({ state: "exited", exitCode: 0, failure: null, attempt: 2 });
    await a.fetch(id, path.join(tmp, "wall-out"));
    expect(await reference).toBe(0);
    const got = fs.readFileSync(path.join(tmp, "wall-out", "series.csv"));
    expect(got.toString().trimEnd().split("\n")).toHaveLength(1 + 3000);
    expect(sha256(got)).toBe(sha256(fs.readFileSync(path.join(tmp, "wall-ref", "series.csv"))));
  }, 240_000);
});

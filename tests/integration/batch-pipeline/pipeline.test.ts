// The broker's pipeline (a child process, as in tests/integration/broker) against the real batch
// scheduler from Debian's packages and an OpenSSH login node on loopback, through Cluster rows of
// kind "batch-ssh": done with imports and estimates, a failing sampler, a wall-time stop resumed from
// its checkpoint, cancellation, a broker killed mid-dispatch, and a wrong host key.
import fs from "node:fs";
import path from "node:path";
import crypto from "node:crypto";
import { spawn } from "node:child_process";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { QueryTypes } from "sequelize";
import { useTestDatabase } from "@/tests/support/db";
import { stopBoss } from "@/lib/queue/boss";
import { cancelEnsemble } from "@/lib/ensembles/cancel-ensemble";
import { loadIdentity } from "@/lib/auth/identity";
import type { SshConnection } from "@/broker/adapters/ssh-connection";
import { db, type Cluster } from "@/models";
import {
  BrokerProcess, freePort, isingSpec, ledgerOf, makeCatalogSamplers, makePeople, removeTempDirs, startSmtp, stateCounts, submit, tempDir, waitFor,
} from "@/tests/integration/broker/support";
import { activeJobs, installFailingSampler, login, makeBatchClusterRow, startPipelineCluster, stopPipelineCluster, taskOutputs, tasksStartedPerRun } from "./support";

const started = startPipelineCluster();
const conn = "conn" in started ? started.conn : null;
if (!conn) console.warn(`batch-pipeline suite skipped: ${"skip" in started ? started.skip : ""}`);

const ROOT = path.resolve(import.meta.dirname, "../../..");
const t = useTestDatabase();
const sha256 = (b: Buffer) => crypto.createHash("sha256").update(b).digest("hex");
const ensembleState = (id: string) => async () => (await db().Ensemble.findByPk(id))!.state;
const eventsOf = (runId: string) => db().RunEvent.findAll({ where: { runId }, order: [["id", "ASC"]] });
const single = (T: number) => ({ scan: [], fixed: { L: 8, T, algorithm: "metropolis" }, replicas: 1 });
// ~3M single-site sweeps of L=32: about 45 s of one core here, longer than the wall-time warning can take to come.
const LONG = { fixed: { L: 32, T: 2.3, algorithm: "metropolis" }, thermalization: 1000, measurements: 3000, interval: 1000 };

describe.skipIf(!conn)("broker pipeline on the real batch scheduler over SSH", () => {
  const c = conn!;
  let ssh: SshConnection;
  let smtp: Awaited<ReturnType<typeof startSmtp>>;
  let broker: BrokerProcess;
  let people: Awaited<ReturnType<typeof makePeople>>;
  const rows: Record<string, Cluster> = {};

  beforeAll(async () => {
    await makeCatalogSamplers();
    people = await makePeople(5000);
    ssh = login(c);
    rows.hpc = await makeBatchClusterRow(c, { name: "hpc", slotLimit: 8 });
    rows.failing = await makeBatchClusterRow(c, { name: "hpc-failing", settings: { samplerCommand: await installFailingSampler(ssh, c) } });
    // The cluster's own wall limit caps each attempt at the scheduler's unit, one minute, and the
    // sampler is warned 55 s ahead (sbatch --signal=B:TERM@55), so a stop comes 5–35 s after start.
    rows.short = await makeBatchClusterRow(c, { name: "hpc-short", settings: { maxWallSeconds: 60, wallSignalSeconds: 55 } });
    const other = crypto.createHash("sha256").update("not the login node's key").digest("base64").replace(/=+$/, "");
    rows.spoofed = await makeBatchClusterRow(c, { name: "hpc-spoofed", fingerprint: `SHA256:${other}` });
    smtp = await startSmtp();
    broker = new BrokerProcess(t, { dataDir: tempDir("batch-pipeline"), smtpPort: smtp.port, healthPort: await freePort() });
    await broker.start();
  }, 120_000);

  afterAll(async () => {
    await broker?.kill();
    await ssh?.close();
    await Promise.all([smtp?.close(), stopBoss({ graceful: false })]);
    stopPipelineCluster();
    removeTempDirs();
    fs.rmSync(c.workRoot, { recursive: true, force: true }); // this suite's staged runs (same machine)
  });

  it("a 3-point × 2-replica ising2d ensemble goes to done: 6 imports, run and point estimates, balanced ledger", async () => {
    const sub = await submit(people.researcher, isingSpec("hpc", people.allocationName));
    await waitFor("ensemble done", ensembleState(sub.ensembleId), (s) => s !== "active", 150_000, broker);
    expect(await stateCounts(sub.ensembleId)).toEqual({ done: 6 });
    const runs = await db().Run.findAll({ where: { ensembleId: sub.ensembleId } });
    for (const run of runs) {
      expect(run.schedulerJobId).toMatch(/^\d+_\d+$/); // an array task of the real scheduler
      expect((await db().Import.findAll({ where: { runId: run.id } })).map((i) => i.state)).toEqual(["accepted"]);
      const [{ n }] = await t.sequelize.query<{ n: string }>(
        "SELECT sum(cardinality(values)) AS n FROM series WHERE run_id = $1 AND observable = 'e'", { bind: [run.id], type: QueryTypes.SELECT });
      expect(Number(n)).toBe(400);
      expect(await db().Estimate.count({ where: { runId: run.id, scope: "run", isCurrent: true } })).toBeGreaterThanOrEqual(4);
      expect(JSON.parse(fs.readFileSync(path.join(c.workRoot, run.id, "run.json"), "utf8")).runId).toBe(run.id);
      // The cluster's prelude ran in the run's one task, with the run id in the task's environment.
      expect(taskOutputs(c.workRoot, run.id)).toEqual([expect.stringContaining(`prelude: ${run.id}`)]);
    }
    const points = await db().Estimate.findAll({ where: { ensembleId: sub.ensembleId, scope: "point", isCurrent: true, observable: "e" } });
    expect(new Set(points.map((e) => e.pointId)).size).toBe(3);
    const ledger = await ledgerOf(sub.ensembleId);
    expect(ledger.charge).toBeGreaterThan(0);
    expect(ledger.reserve).toBeCloseTo((ledger.charge ?? 0) + (ledger.release ?? 0), 4);
  }, 180_000);

  it("a sampler exiting 1 fails both runs with nonzero_exit, exit code 1 and its stderr, and writes exactly one e-mail", async () => {
    const sub = await submit(people.researcher, isingSpec("hpc-failing", people.allocationName, { ...single(2.3), replicas: 2 }));
    await waitFor("ensemble failed", ensembleState(sub.ensembleId), (s) => s !== "active", 90_000, broker);
    const runs = await db().Run.findAll({ where: { ensembleId: sub.ensembleId } });
    expect(runs.map((r) => [r.state, r.failureReason, r.exitCode])).toEqual([["failed", "nonzero_exit", 1], ["failed", "nonzero_exit", 1]]);
    for (const r of runs) expect(r.stderrTail).toContain("lattice allocation failed: out of memory");
    await waitFor("digest sent", () => db().OutboxMessage.findAll({ where: { kind: "run.failed" } }), (m) => m.some((x) => x.state === "sent"), 30_000, broker);
    await new Promise((r) => setTimeout(r, 4000)); // past the 2 s digest window and several polls
    const mail = await db().OutboxMessage.findAll({ where: { kind: "run.failed" } });
    expect(mail.map((m) => m.to)).toEqual([[people.researcher.email]]);
    for (const r of runs) expect(mail[0].textBody).toContain(r.id);
  }, 120_000);

  it("a run over its wall time comes back timed out with a checkpoint and resumes to the series of an uninterrupted run", async () => {
    const sub = await submit(people.researcher, isingSpec("hpc-short", people.allocationName, {
      scan: [], replicas: 1, ...LONG, resources: { cores: 1, wallMinutes: 10, memoryMb: 256 }, retry: { maxAttempts: 4, on: [], resumeOnWallTime: true },
    }));
    const runId = sub.runIds[0];
    // The cap is read at each dispatch: once the first attempt runs under the 60 s limit, the
    // coordinator raises it (as for a longer partition), so the resumed attempt runs to the end.
    await waitFor("first attempt running", () => db().Run.findByPk(runId), (r) => r!.state === "running", 90_000, broker);
    await rows.short.update({ settings: { ...rows.short.settings, maxWallSeconds: 600 } });
    // The uninterrupted reference, from the same staged run.json.
    const ref = tempDir("wall-ref");
    const reference = new Promise<number | null>((resolve) => {
      const child = spawn(process.execPath, ["--import", path.join(ROOT, "node_modules/tsx/dist/loader.mjs"), path.join(ROOT, "cluster-fake/samplers/cli.ts"),
        "ising2d", path.join(c.workRoot, runId, "run.json"), path.join(ref, "out")], { stdio: "ignore" });
      child.once("exit", (code) => resolve(code));
    });
    const stop = await waitFor("a checkpointed wall-time stop", () => eventsOf(runId),
      (evs) => evs.some((e) => e.toState === "failed" && String((e.detail as { message?: string }).message).includes("checkpoint written")), 150_000, broker);
    const first = stop.find((e) => e.toState === "failed")!;
    expect((first.detail as { reason: string }).reason).toBe("wall_time_exceeded");
    await waitFor("ensemble done", ensembleState(sub.ensembleId), (s) => s !== "active", 180_000, broker);
    const run = (await db().Run.findByPk(runId))!;
    expect(run.state).toBe("done");
    expect(run.attempt).toBe(2); // one stop at the 60 s limit, one resumed attempt
    const stops = (await eventsOf(runId)).filter((e) => e.toState === "failed");
    expect(stops.map((e) => (e.detail as { reason: string }).reason)).toEqual(["wall_time_exceeded"]);
    expect(await reference).toBe(0);
    const archived = await db().RunArtifact.findAll({ where: { runId, role: "series" } });
    expect(archived.map((a) => a.artifactSha256)).toEqual([sha256(fs.readFileSync(path.join(ref, "out", "series.csv")))]);
    console.log(`batch wall-time run: stopped by the 55 s warning of a 60 s limit (${String((first.detail as { message?: string }).message)}), done on attempt ${run.attempt}`);
  }, 330_000);

  it("a cancelled ensemble ends cancelled and leaves no jobs in the scheduler", async () => {
    const sub = await submit(people.researcher, isingSpec("hpc", people.allocationName, { scan: [], replicas: 3, ...LONG }));
    await waitFor("a run running", () => stateCounts(sub.ensembleId), (s) => (s.running ?? 0) >= 1, 90_000, broker);
    const who = (await loadIdentity(people.researcher.id, "session"))!;
    await cancelEnsemble({ actorId: who.userId, ip: null, requestId: "batch-pipeline" }, who, sub.ensembleId);
    await waitFor("all cancelled", () => stateCounts(sub.ensembleId), (s) => s.cancelled === 3, 60_000, broker);
    expect((await db().Ensemble.findByPk(sub.ensembleId))!.state).toBe("cancelled");
    const left = await waitFor("scheduler wound down", () => activeJobs(ssh, c.user), (j) => j.length === 0, 60_000, broker);
    expect(left).toEqual([]);
    const procs = (await ssh.exec("ps -u $(id -u) -o args=")).stdout.split("\n").filter((l) => sub.runIds.some((id) => l.includes(id)));
    expect(procs).toEqual([]);
    const ledger = await ledgerOf(sub.ensembleId);
    expect(ledger.reserve).toBeCloseTo((ledger.charge ?? 0) + (ledger.release ?? 0), 4);
  }, 180_000);

  it("the broker killed mid-dispatch and restarted submits nothing twice", async () => {
    await broker.kill();
    const sub = await submit(people.researcher, isingSpec("hpc", people.allocationName, {
      scan: [{ param: "T", values: [2.0, 2.3, 2.6, 2.9] }], replicas: 2, thermalization: 50, measurements: 200,
    }));
    await broker.start();
    // Kill once the dispatch tokens are written (before or while sbatch runs), then once more a little later.
    const tokened = await waitFor("dispatch tokens written", () => db().Run.findAll({ where: { ensembleId: sub.ensembleId } }),
      (rs) => rs.some((r) => r.dispatchToken !== null), 60_000, broker);
    const atKill = [tokened.filter((r) => r.state === "queued").length];
    await broker.kill();
    await broker.start();
    await new Promise((r) => setTimeout(r, 1500));
    atKill.push((await stateCounts(sub.ensembleId)).queued ?? 0);
    await broker.kill();
    await broker.start();
    await waitFor("ensemble done", ensembleState(sub.ensembleId), (s) => s !== "active", 150_000, broker);
    console.log(`queued runs at the two kills: ${atKill.join(", ")}`);
    expect(await stateCounts(sub.ensembleId)).toEqual({ done: 8 });
    // The scheduler started one task per run, on the first attempt, and each run was dispatched once.
    expect(tasksStartedPerRun(c.workRoot, sub.runIds)).toEqual(Object.fromEntries(sub.runIds.map((id) => [id, 1])));
    const runs = await db().Run.findAll({ where: { ensembleId: sub.ensembleId } });
    expect(runs.map((r) => r.attempt)).toEqual(runs.map(() => 1));
    for (const r of runs) expect((await eventsOf(r.id)).filter((e) => e.toState === "dispatched")).toHaveLength(1);
    const imports = await t.sequelize.query<{ n: string }>("SELECT count(*) AS n FROM imports WHERE run_id = ANY($1::uuid[])", { bind: [sub.runIds], type: QueryTypes.SELECT });
    expect(Number(imports[0].n)).toBe(8);
  }, 240_000);

  it("a login node presenting a host key other than the pinned one is refused: cluster unhealthy, staff alerted, nothing submitted", async () => {
    const sub = await submit(people.researcher, isingSpec("hpc-spoofed", people.allocationName, single(2.3)));
    const row = await waitFor("cluster unhealthy", async () => (await db().Cluster.findByPk(rows.spoofed.id))!, (x) => !x.healthy, 60_000, broker);
    expect(row.healthNote).toMatch(/^host key mismatch: the server presented SHA256:\S+, SHA256:\S+ is pinned/);
    expect(row.healthNote).toContain(c.hostKeyFingerprint);
    const alerts = await waitFor("alert written", () => db().OutboxMessage.findAll({ where: { kind: "cluster.fault" } }), (m) => m.length > 0, 30_000, broker);
    expect([...alerts[0].to].sort()).toEqual([people.admin.email, people.coordinator.email].sort());
    expect(await stateCounts(sub.ensembleId)).toEqual({ queued: 1 });
    expect(fs.existsSync(path.join(c.workRoot, sub.runIds[0]))).toBe(false); // nothing staged
    await rows.spoofed.update({ active: false });
  }, 120_000);
});

// The broker end to end over real SSH to fake nodes and real PostgreSQL, the broker a child
// process: submit → dispatch → watch → collect → import → estimates → settle, a failing sampler
// with retry and one digest e-mail, a host-key mismatch, and a wall-time stop resumed from its checkpoint.
import fs from "node:fs";
import path from "node:path";
import crypto from "node:crypto";
import { execFileSync } from "node:child_process";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { QueryTypes } from "sequelize";
import type { FakeCluster } from "@/cluster-fake/server/server";
import type { MailStore } from "@/lib/mail/mail-store-server";
import { INDEX_FILE } from "@/lib/mail/mail-store-server";
import { useTestDatabase } from "@/tests/support/db";
import { stopBoss } from "@/lib/queue/boss";
import { cancelEnsemble } from "@/lib/ensembles/cancel-ensemble";
import { loadIdentity } from "@/lib/auth/identity";
import { db, type Cluster, type User } from "@/models";
import {
  BrokerProcess, clientKeyPair, freePort, isingSpec, ledgerOf, makeCatalogSamplers, makeClusterRow, makePeople, startNode, startSmtp,
  removeTempDirs, stateCounts, submit, tempDir, waitFor,
} from "./support";

const t = useTestDatabase();
const ROOT = path.resolve(import.meta.dirname, "..", "..", "..");
let good: Awaited<ReturnType<typeof startNode>>;
let bad: Awaited<ReturnType<typeof startNode>>;
let forger: Awaited<ReturnType<typeof startNode>>;
let smtp: MailStore;
let broker: BrokerProcess;
let people: Awaited<ReturnType<typeof makePeople>>;
const clusters: Record<"good" | "bad" | "forger" | "spoofed" | "short", Cluster> = {} as never;

beforeAll(async () => {
  await makeCatalogSamplers();
  people = await makePeople();
  good = await startNode({ slots: 2 });
  bad = await startNode({ slots: 2, samplerCommand: [process.execPath, path.join(import.meta.dirname, "fixtures", "failing-sampler.mjs"), "{runJson}"] });
  // The fake-cluster tests' stand-in sampler: exit 0, but a bundle that is not an ising2d bundle.
  forger = await startNode({ slots: 2, samplerCommand: [process.execPath, path.join(ROOT, "tests/integration/fake-cluster/fixtures/fake-sampler.mjs"), "{sampler}", "{runJson}", "{outDir}"] });
  smtp = await startSmtp();
  clusters.good = await makeClusterRow(good.node, good.clientKey, { name: "good" });
  clusters.bad = await makeClusterRow(bad.node, bad.clientKey, { name: "bad" });
  clusters.forger = await makeClusterRow(forger.node, forger.clientKey, { name: "forger" });
  // Pinned to a key that is not the node's: every connection must be refused.
  const other = crypto.createHash("sha256").update("not the node's key").digest("base64").replace(/=+$/, "");
  clusters.spoofed = await makeClusterRow(good.node, good.clientKey, { name: "spoofed", fingerprint: `SHA256:${other}` });
  // The cluster's own wall-time limit (settings.maxWallSeconds) caps each attempt at 2 s.
  clusters.short = await makeClusterRow(good.node, good.clientKey, { name: "short", settings: { maxWallSeconds: 2 } });
  broker = new BrokerProcess(t, { dataDir: tempDir("broker"), smtpPort: smtp.port, healthPort: await freePort() });
  await broker.start();
});

afterAll(async () => {
  await broker?.stop();
  await Promise.all([good?.node.close(), bad?.node.close(), forger?.node.close(), smtp?.close(), stopBoss({ graceful: false })]);
  removeTempDirs();
});

const ensembleState = (id: string) => async () => (await db().Ensemble.findByPk(id))!.state;
const mails = () => {
  const file = path.join(smtp.mailDir, INDEX_FILE);
  return fs.existsSync(file) ? fs.readFileSync(file, "utf8").trim().split("\n").filter(Boolean).map((l) => JSON.parse(l) as { to: string[]; subject: string }) : [];
};
const eventsOf = (runId: string) => db().RunEvent.findAll({ where: { runId }, order: [["id", "ASC"]] });

describe("broker flow", () => {
  it("a 3-point × 2-replica ising2d ensemble goes from queued to done: 6 imports, estimates, balanced ledger", async () => {
    const sub = await submit(people.researcher, isingSpec("good", people.allocationName, { notify: { onFailure: true, onDone: true } }));
    expect(sub.runIds).toHaveLength(6);
    await waitFor("ensemble done", ensembleState(sub.ensembleId), (s) => s !== "active", 90_000, broker);
    expect(await stateCounts(sub.ensembleId)).toEqual({ done: 6 });
    expect((await db().Ensemble.findByPk(sub.ensembleId))!.state).toBe("done");

    const runs = await db().Run.findAll({ where: { ensembleId: sub.ensembleId }, include: ["point"] });
    for (const run of runs) {
      // The staged run.json is DESIGN.md's contract, field for field.
      const staged = JSON.parse(fs.readFileSync(path.join(good.node.options.workRoot, run.id, "run.json"), "utf8"));
      expect(staged).toEqual({
        format: "ergodex.run/1", runId: run.id, sampler: { name: "ising2d", version: isingSpec("", "").sampler.version },
        params: run.point!.params, seed: run.seed, thermalization: 100, measurements: 400, interval: 1,
      });
      const imports = await db().Import.findAll({ where: { runId: run.id } });
      expect(imports.map((i) => i.state)).toEqual(["accepted"]);
      const observables = await t.sequelize.query<{ observable: string; n: string }>(
        "SELECT observable, sum(cardinality(values)) AS n FROM series WHERE run_id = $1 GROUP BY observable ORDER BY observable",
        { bind: [run.id], type: QueryTypes.SELECT });
      expect(observables.map((o) => [o.observable, Number(o.n)])).toEqual([["absM", 400], ["e", 400], ["m2", 400], ["m4", 400], ["sweep", 400]]);
      expect(await db().Estimate.count({ where: { runId: run.id, scope: "run", isCurrent: true } })).toBeGreaterThanOrEqual(4);
      const toDone = (await eventsOf(run.id)).filter((e) => e.toState === "done");
      expect(toDone).toHaveLength(1);
      expect(run.samplerCommit).toMatch(/^sha256:/);
      expect(run.coreHoursUsed).toBeGreaterThan(0);
    }
    // Every point has its combined estimate once both replicas were done.
    const pointEstimates = await db().Estimate.findAll({ where: { ensembleId: sub.ensembleId, scope: "point", isCurrent: true, observable: "e" } });
    expect(new Set(pointEstimates.map((e) => e.pointId)).size).toBe(3);

    const ledger = await ledgerOf(sub.ensembleId);
    // The reservation is the runs' shares (1 core × 5 min each, as submission rounds it).
    expect(ledger.reserve).toBeCloseTo(runs.reduce((s, r) => s + r.reservedCoreHours, 0), 4);
    expect(ledger.reserve).toBeGreaterThan(6 * 5 / 60 - 0.001);
    expect(ledger.charge).toBeGreaterThan(0);
    expect(ledger.reserve).toBeCloseTo((ledger.charge ?? 0) + (ledger.release ?? 0), 4);
    const perRun = await t.sequelize.query<{ n: string }>(
      "SELECT count(DISTINCT run_id) AS n FROM ledger_entries WHERE ensemble_id = $1 AND kind IN ('charge', 'release')",
      { bind: [sub.ensembleId], type: QueryTypes.SELECT });
    expect(Number(perRun[0].n)).toBe(6);
    // notify.onDone: one end-of-ensemble e-mail to the owner.
    const done = await db().OutboxMessage.findAll({ where: { kind: "ensemble.done" } });
    expect(done.map((m) => m.to)).toEqual([[people.researcher.email]]);
  });

  it("a sampler exiting 1 is retried per the spec, then fails with nonzero_exit, its stderr tail, and one digest e-mail", async () => {
    const sub = await submit(people.researcher, isingSpec("bad", people.allocationName, {
      scan: [{ param: "T", values: [2.3] }], retry: { maxAttempts: 2, on: ["nonzero_exit"], resumeOnWallTime: false },
    }));
    await waitFor("ensemble failed", ensembleState(sub.ensembleId), (s) => s !== "active", 60_000, broker);
    expect((await db().Ensemble.findByPk(sub.ensembleId))!.state).toBe("failed");
    const runs = await db().Run.findAll({ where: { ensembleId: sub.ensembleId } });
    expect(runs).toHaveLength(2);
    for (const run of runs) {
      expect(run.state).toBe("failed");
      expect(run.failureReason).toBe("nonzero_exit");
      expect(run.exitCode).toBe(1);
      expect(run.stderrTail).toContain("lattice allocation failed: out of memory");
      expect(run.attempt).toBe(2);
      const path_ = (await eventsOf(run.id)).map((e) => e.toState);
      expect(path_.filter((s) => s === "failed")).toHaveLength(2);
      expect(path_.filter((s) => s === "queued")).toHaveLength(2); // created, and the one retry
    }
    const digest = await waitFor("digest e-mail", () => db().OutboxMessage.findAll({ where: { kind: "run.failed" } }), (m) => m.some((x) => x.state === "sent"), 30_000, broker);
    // Outlive the digest window and a few polls: still exactly one.
    await new Promise((r) => setTimeout(r, 4000));
    expect(await db().OutboxMessage.count({ where: { kind: "run.failed" } })).toBe(1);
    expect(digest[0].to).toEqual([people.researcher.email]);
    expect(digest[0].textBody).toContain(runs[0].id);
    const name = (await db().Ensemble.findByPk(sub.ensembleId))!.name;
    const delivered = mails().filter((m) => m.subject.includes(name));
    expect(delivered.map((m) => [m.to, m.subject])).toEqual([[[people.researcher.email], `[Ergodex] 2 runs failed in ensemble "${name}"`]]);
    const ledger = await ledgerOf(sub.ensembleId);
    expect(ledger.reserve).toBeCloseTo((ledger.charge ?? 0) + (ledger.release ?? 0), 4);
  });

  it("a bundle the importer rejects fails the run with import_rejected and the reason, leaving no series", async () => {
    const sub = await submit(people.researcher, isingSpec("forger", people.allocationName, {
      scan: [], fixed: { L: 8, T: 2.3, algorithm: "metropolis" }, replicas: 1, thermalization: 5, measurements: 20,
    }));
    await waitFor("ensemble failed", ensembleState(sub.ensembleId), (s) => s !== "active", 60_000, broker);
    const run = (await db().Run.findByPk(sub.runIds[0]))!;
    expect(run).toMatchObject({ state: "failed", failureReason: "import_rejected", exitCode: 0 });
    expect(run.failureDetail).toMatch(/manifest|series|sampler|observable/i);
    expect((await db().Import.findAll({ where: { runId: run.id } })).map((i) => i.state)).toEqual(["rejected"]);
    expect(await db().Series.count({ where: { runId: run.id } })).toBe(0);
    const ledger = await ledgerOf(sub.ensembleId);
    expect(ledger.reserve).toBeCloseTo((ledger.charge ?? 0) + (ledger.release ?? 0), 4);
  });

  it("a host-key mismatch is refused: cluster unhealthy with a note, admins and coordinators e-mailed, nothing dispatched", async () => {
    const sub = await submit(people.researcher, isingSpec("spoofed", people.allocationName, { scan: [], fixed: { L: 8, T: 2.3, algorithm: "metropolis" }, replicas: 1 }));
    const cluster = await waitFor("cluster unhealthy", async () => (await db().Cluster.findByPk(clusters.spoofed.id))!, (c) => !c.healthy, 30_000, broker);
    expect(cluster.healthNote).toMatch(/^host key mismatch: the server presented SHA256:\S+, SHA256:\S+ is pinned/);
    const alert = await waitFor("alert sent", () => db().OutboxMessage.findAll({ where: { kind: "cluster.fault" } }), (m) => m.some((x) => x.state === "sent"), 30_000, broker);
    expect(alert).toHaveLength(1);
    expect([...alert[0].to].sort()).toEqual([people.admin.email, people.coordinator.email].sort());
    expect(mails().filter((m) => m.subject.includes("host key mismatch"))).toHaveLength(1);
    // The run never left queued and the node never heard of it.
    expect(await stateCounts(sub.ensembleId)).toEqual({ queued: 1 });
    expect(good.node.scheduler.report(sub.runIds, false).unknown).toEqual(sub.runIds);
    const h = await broker.health();
    expect(h.status).toBe("degraded");
    expect(h.clusters.find((c) => c.name === "spoofed")?.healthy).toBe(false);
    await clusters.spoofed.update({ active: false }); // out of the way of the other tests
  });

  it("a cluster that refuses our key is marked unhealthy and the staff alerted, not retried every cycle", async () => {
    const stranger = clientKeyPair(); // not in the node's authorized_keys
    const refused = await makeClusterRow(good.node, stranger.private, { name: "refused" });
    const sub = await submit(people.researcher, isingSpec("refused", people.allocationName, { scan: [], fixed: { L: 8, T: 2.3, algorithm: "metropolis" }, replicas: 1 }));
    const c = await waitFor("cluster unhealthy", async () => (await db().Cluster.findByPk(refused.id))!, (x) => !x.healthy, 30_000, broker);
    expect(c.healthNote).toMatch(/^auth_failed: 127\.0\.0\.1 refused our SSH key/);
    const alerts = await waitFor("alert", () => db().OutboxMessage.findAll({ where: { kind: "cluster.fault" } }),
      (m) => m.some((x) => x.subject.includes('"refused"')), 30_000, broker);
    expect(alerts.filter((x) => x.subject.includes('"refused"'))).toHaveLength(1);
    expect(await stateCounts(sub.ensembleId)).toEqual({ queued: 1 });
    // Three more cycles: the broker does not knock again (it probes such a cluster every 30 s).
    const knocks = good.node.stats.authRejected;
    await new Promise((r) => setTimeout(r, 3000));
    expect(good.node.stats.authRejected).toBe(knocks);
    await refused.update({ active: false });
  });

  it("a run stopped at the cluster's wall-time limit resumes from its checkpoint; its series is byte-identical to an uninterrupted run", async () => {
    // L=16, 1000 + 4000×600 sweeps: about 8 s of work on an idle machine (4000×150 once finished inside
    // 2 s), so the cluster's 2 s limit stops the
    // first attempt part-way. Once one stop has written a checkpoint, the coordinator raises the
    // limit (as for a longer partition): the attempts after it resume from the checkpoint and finish.
    // Raising it keeps the number of attempts bounded however fast or slow the machine is.
    const spec = isingSpec("short", people.allocationName, {
      scan: [], fixed: { L: 16, T: 2.3, algorithm: "metropolis" }, replicas: 1, thermalization: 1000, measurements: 4000, interval: 600,
      resources: { cores: 1, wallMinutes: 10, memoryMb: 256 }, retry: { maxAttempts: 10, on: [], resumeOnWallTime: true },
    });
    const sub = await submit(people.researcher, spec);
    const runId = sub.runIds[0];
    await waitFor("a checkpointed wall-time stop", () => eventsOf(runId),
      (evs) => evs.some((e) => e.toState === "failed" && String((e.detail as { message?: string }).message).includes("checkpoint written")), 90_000, broker);
    await clusters.short.update({ settings: { maxWallSeconds: 600 } });
    await waitFor("ensemble done", ensembleState(sub.ensembleId), (s) => s !== "active", 120_000, broker);
    const run = (await db().Run.findByPk(runId))!;
    expect({ state: run.state, reason: run.failureReason, detail: run.failureDetail, attempt: run.attempt }).toMatchObject({ state: "done" });
    expect(run.attempt).toBeGreaterThan(1);
    console.log(`wall-time run: done after ${run.attempt} attempts (2 s limit, then 600 s)`);
    const stops = (await eventsOf(run.id)).filter((e) => e.toState === "failed");
    expect(stops.length).toBe(run.attempt - 1);
    for (const e of stops) expect((e.detail as { reason: string }).reason).toBe("wall_time_exceeded");
    expect(good.node.scheduler.report([run.id], false).runs[0].attempt).toBe(run.attempt);

    // The same run.json, uninterrupted, through the real samplers CLI.
    const dir = tempDir("uninterrupted");
    fs.copyFileSync(path.join(good.node.options.workRoot, run.id, "run.json"), path.join(dir, "run.json"));
    execFileSync(process.execPath, [path.join(ROOT, "node_modules/tsx/dist/cli.mjs"), path.join(ROOT, "cluster-fake/samplers/cli.ts"), "ising2d", path.join(dir, "run.json"), path.join(dir, "out")], { cwd: ROOT });
    const expected = crypto.createHash("sha256").update(fs.readFileSync(path.join(dir, "out", "series.csv"))).digest("hex");
    const archived = await db().RunArtifact.findAll({ where: { runId: run.id, role: "series" } });
    expect(archived.map((a) => a.artifactSha256)).toEqual([expected]);
    fs.rmSync(dir, { recursive: true, force: true });
    const ledger = await ledgerOf(sub.ensembleId);
    expect(ledger.reserve).toBeCloseTo((ledger.charge ?? 0) + (ledger.release ?? 0), 4);
  }, 240_000);

  it("cancelling an ensemble stops its running and dispatched runs on the cluster and settles them", async () => {
    const sub = await submit(people.researcher, isingSpec("good", people.allocationName, {
      scan: [], fixed: { L: 16, T: 2.3, algorithm: "metropolis" }, replicas: 3, thermalization: 1000, measurements: 3000, interval: 150,
    }));
    // Two run (the node has two slots), the third waits on the node as dispatched.
    await waitFor("two running", () => stateCounts(sub.ensembleId), (c) => c.running === 2 && c.dispatched === 1, 60_000, broker);
    const who = (await loadIdentity(people.researcher.id, "session"))!;
    const result = await cancelEnsemble({ actorId: who.userId, ip: null, requestId: "broker-test" }, who, sub.ensembleId);
    expect(result).toMatchObject({ cancelled: 0, onCluster: 3, cancelJobQueued: true });
    await waitFor("all cancelled", () => stateCounts(sub.ensembleId), (c) => c.cancelled === 3, 30_000, broker);
    expect((await db().Ensemble.findByPk(sub.ensembleId))!.state).toBe("cancelled");
    const onNode = good.node.scheduler.report(sub.runIds, false).runs;
    expect(onNode.map((r) => r.state)).toEqual(["cancelled", "cancelled", "cancelled"]);
    const runs = await db().Run.findAll({ where: { ensembleId: sub.ensembleId } });
    expect(runs.filter((r) => (r.coreHoursUsed ?? 0) > 0)).toHaveLength(2); // the two that ran
    const ledger = await ledgerOf(sub.ensembleId);
    expect(ledger.charge).toBeGreaterThan(0);
    expect(ledger.reserve).toBeCloseTo((ledger.charge ?? 0) + (ledger.release ?? 0), 4);
  });

  it("stops gracefully on SIGTERM (exit 0)", async () => {
    expect(await broker.stop()).toBe(0);
  });
});

export type { FakeCluster, User };

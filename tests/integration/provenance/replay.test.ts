// Replay of a run over real SSH to a fake node: a run submitted, dispatched, collected and imported by the
// broker's own pipeline is replayed with the same run.json and its series compared byte for byte with the
// archive. Identical when nothing changed; a tampered archive and a changed sampler build are differences
// that name the file, the byte, the row and sweep, and the build.
import fs from "node:fs";
import path from "node:path";
import pino from "pino";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { sshKeyFingerprint } from "@/broker/adapters/fake-cluster-adapter";
import { replayRunJob } from "@/broker/jobs/replay-run";
import { serveCluster } from "@/broker/pipeline/cycle";
import { collectRun } from "@/broker/pipeline/collect";
import { loadIdentity, type Identity } from "@/lib/auth/identity";
import { closeAdapters } from "@/lib/clusters/adapter-for";
import { addExhibit, createManuscript } from "@/lib/manuscripts/edit-manuscript";
import { freezeManuscript, isRunFrozen } from "@/lib/manuscripts/freeze-manuscript";
import { sealSecret } from "@/lib/crypto/secret-box";
import { replaysOfRun, replayStatus, requestReplay, REPLAY_QUEUE, type ReplayStatus } from "@/lib/provenance/replay/replay-run";
import { stopBoss } from "@/lib/queue/boss";
import { resolveArchived } from "@/lib/storage/archive-path";
import { db, type Cluster, type Run } from "@/models";
import { makeEnsemble, makeUser, useTestDatabase } from "@/tests/support/db";
import { isingSpec, makeCatalogSamplers, makePeople, removeTempDirs, startNode, submit, waitFor } from "@/tests/integration/broker/support";

useTestDatabase();
const log = pino({ level: "silent" });
const audit = { actorId: null, ip: null, requestId: "replay-test" };
const THERMALIZATION = 30;
let good: Awaited<ReturnType<typeof startNode>>;
let patched: Awaited<ReturnType<typeof startNode>>;
let broken: Awaited<ReturnType<typeof startNode>>;
let cluster: Cluster;
let run: Run;
let who: Identity;
let seriesFile: { path: string; sha256: string; storagePath: string };
let restore: Buffer | null = null;

/** A cluster row for `node`, its client key sealed with the process's own key-encryption key (the adapter opens it in-process). */
const clusterFields = (n: typeof good) => ({ port: n.node.port, hostKeyFingerprint: sshKeyFingerprint(n.node.hostPublicKey), privateKeyEncrypted: sealSecret(n.clientKey) });

beforeAll(async () => {
  await makeCatalogSamplers();
  const people = await makePeople();
  good = await startNode({ slots: 2 });
  patched = await startNode({ slots: 2, samplerCommand: [process.execPath, path.join(import.meta.dirname, "fixtures", "patched-sampler.mjs"), "{sampler}", "{runJson}", "{outDir}"] });
  broken = await startNode({ slots: 1, samplerCommand: [process.execPath, path.join(import.meta.dirname, "..", "broker", "fixtures", "failing-sampler.mjs"), "{runJson}"] });
  cluster = await db().Cluster.create({ name: "replay-node", kind: "fake-ssh", host: "127.0.0.1", username: "ergodex", workDir: good.node.options.workRoot, slotLimit: 2, settings: {}, ...clusterFields(good) });
  // One chain, small: 6×6 at an unusual temperature so no other test's archived series shares its bytes.
  const sub = await submit(people.researcher, isingSpec("replay-node", people.allocationName, {
    fixed: { L: 6, algorithm: "metropolis" }, scan: [{ param: "T", values: [2.377] }], replicas: 1, thermalization: THERMALIZATION, measurements: 300,
  }));
  // The broker's pipeline, driven in-process: dispatch and poll on the cluster, collect when the sampler is done.
  run = await waitFor("run done", async () => {
    await serveCluster(cluster, log);
    const r = (await db().Run.findByPk(sub.runIds[0]))!;
    if (r.state === "collecting") await collectRun(r.id, log);
    return (await db().Run.findByPk(sub.runIds[0]))!;
  }, (r) => r.state === "done" || r.state === "failed", 60_000);
  expect(run.state).toBe("done");
  who = (await loadIdentity(people.researcher.id, "session"))!;
  const [row] = (await db().sequelize.query(`SELECT ra.path, a.sha256, a.storage_path AS "storagePath" FROM run_artifacts ra JOIN artifacts a ON a.sha256 = ra.artifact_sha256
    WHERE ra.run_id = $1 AND ra.role = 'series'`, { bind: [run.id], type: "SELECT" })) as (typeof seriesFile)[];
  seriesFile = row;
}, 120_000);

afterAll(async () => {
  if (restore) fs.writeFileSync(resolveArchived(seriesFile.storagePath), restore);
  await closeAdapters();
  await Promise.all([good?.node.close(), patched?.node.close(), broken?.node.close(), stopBoss({ graceful: false })]);
  removeTempDirs();
});

/** Request a replay, take its job off the queue as the broker would, run the handler; the recorded replay. */
async function replay(): Promise<ReplayStatus> {
  const { id, created } = await requestReplay(audit, who, run.id);
  expect(created).toBe(true);
  const [job] = (await db().sequelize.query(`SELECT id, data FROM pgboss.job WHERE name = $1 AND data->>'replayId' = $2`, { bind: [REPLAY_QUEUE, id], type: "SELECT" })) as { id: string; data: { replayId: string } }[];
  expect(job, "the replay was queued").toBeDefined();
  expect((await replayStatus(id))!.state).toBe("queued");
  await replayRunJob.handle(job.data, { jobId: job.id, retryCount: 0, log });
  return (await replayStatus(id))!;
}

const counts = async () => {
  const q = async (sql: string) => Number(((await db().sequelize.query(sql, { bind: [run.ensembleId], type: "SELECT" })) as { n: string }[])[0].n);
  return {
    runs: await q(`SELECT count(*) AS n FROM runs WHERE ensemble_id = $1`),
    imports: await q(`SELECT count(*) AS n FROM imports i JOIN runs r ON r.id = i.run_id WHERE r.ensemble_id = $1`),
    ledger: await q(`SELECT count(*) AS n FROM ledger_entries WHERE ensemble_id = $1`),
  };
};

describe("replay-run", () => {
  it("replays a done run with the same run.json: the series is byte-identical, nothing imported, nothing charged", async () => {
    const before = await counts();
    const r = await replay();
    expect(r.state, JSON.stringify(r.report)).toBe("identical");
    const report = r.report!;
    expect(report.differences).toEqual([]);
    const series = report.files.find((f) => f.path === seriesFile.path)!;
    expect(series).toMatchObject({ identical: true, archiveIntact: true, archivedSha256: seriesFile.sha256, replaySha256: seriesFile.sha256 });
    expect(report.skipped.map((s) => s.path).sort()).toEqual(["manifest.json", "progress.json"]);
    // Both builds named, and the same: the sampler's code hash from the archived and the replayed manifest.
    expect(report.sampler.archived.commit).toMatch(/^sha256:[0-9a-f]{64}$/);
    expect(report.sampler.replay).toEqual(report.sampler.archived);
    expect(report.sampler.archived.commit).toBe(run.samplerCommit);
    expect(r.samplerVersion).toBe(`ising2d ${report.sampler.archived.version} (${report.sampler.archived.commit})`);
    // The run.json staged differs from the run's only in runId (the replay's own work dir on the node).
    expect(report.runJson!.replaySha256).not.toBe(report.runJson!.runSha256);
    const staged = JSON.parse(fs.readFileSync(path.join(good.node.options.workRoot, r.id, "run.json"), "utf8"));
    const original = JSON.parse(fs.readFileSync(path.join(good.node.options.workRoot, run.id, "run.json"), "utf8"));
    expect({ ...staged, runId: run.id }).toEqual(original);
    expect(report.charged).toBe(false);
    expect(report.coreHours).toBeGreaterThanOrEqual(0);
    expect(await counts()).toEqual(before);
    expect((await replaysOfRun(run.id)).map((x) => x.id)).toEqual([r.id]);
    const finished = await db().AuditEntry.findOne({ where: { action: "run.replay.finished", targetId: run.id } });
    expect(finished!.detail).toMatchObject({ replayId: r.id, outcome: "identical", charged: false });
  }, 60_000);

  it("a tampered archived series is a difference naming the file, the byte, the row and its sweep", async () => {
    const file = resolveArchived(seriesFile.storagePath);
    restore = fs.readFileSync(file);
    const text = restore.toString("utf8");
    // Change the last digit of measurement 100's first observable (line 100 after the header).
    const lines = text.split("\n");
    const lineStart = lines.slice(0, 100).reduce((n, l) => n + l.length + 1, 0);
    const cells = lines[100].split(",");
    const offset = lineStart + cells[0].length + 1 + cells[1].length - 1;
    const tampered = Buffer.from(restore);
    tampered[offset] = tampered[offset] === 0x30 ? 0x31 : 0x30;
    fs.writeFileSync(file, tampered);
    try {
      const r = await replay();
      expect(r.state).toBe("differs");
      const series = r.report!.files.find((f) => f.path === seriesFile.path)!;
      expect(series.archiveIntact).toBe(false);
      expect(series.difference).toEqual({ kind: "bytes", offset, row: 100, sweep: Number(cells[0]), archivedBytes: restore.length, replayBytes: restore.length });
      expect(series.replaySha256).toBe(seriesFile.sha256); // the replay itself reproduced the original bytes
      expect(r.report!.differences).toContain(`${seriesFile.path}: the archived copy no longer hashes to its recorded sha256 ${seriesFile.sha256}`);
      expect(r.report!.differences.some((d) => d.startsWith(`${seriesFile.path}: first differs at byte ${offset}, row 100 (sweep ${cells[0]})`))).toBe(true);
      expect(r.report!.differences.filter((d) => d.startsWith("sampler"))).toEqual([]);
    } finally {
      fs.writeFileSync(file, restore);
      restore = null;
    }
  }, 60_000);

  it("a changed sampler build on the cluster is reported: its version and code hash, and where its series parts", async () => {
    // The cluster's sampler was rebuilt: the same cluster row now reaches a node running the patched build.
    await cluster.update(clusterFields(patched));
    const r = await replay();
    expect(r.state).toBe("differs");
    const { archived, replay: now } = r.report!.sampler;
    expect(now).toEqual({ name: "ising2d", version: `${archived.version}+patched`, commit: `sha256:${"e".repeat(64)}` });
    expect(r.report!.differences).toContain(`sampler version: archived ${archived.version}, replay ${archived.version}+patched`);
    expect(r.report!.differences).toContain(`sampler commit: archived ${archived.commit}, replay sha256:${"e".repeat(64)}`);
    const series = r.report!.files.find((f) => f.path === seriesFile.path)!;
    expect(series.archiveIntact).toBe(true);
    // The fixture alters measurement 10; rows sit at thermalization + k·interval (samplers README), so its sweep is 30 + 10.
    expect(series.difference).toMatchObject({ kind: "bytes", row: 10, sweep: THERMALIZATION + 10 });
    expect(r.samplerVersion).toContain("+patched");
  }, 60_000);

  it("a sampler that fails on the cluster makes a failed replay with the sampler's own words, not a difference", async () => {
    await cluster.update(clusterFields(broken));
    const r = await replay();
    expect(r.state).toBe("failed");
    expect(r.report!.error).toMatch(/^the replayed sampler did not finish: nonzero_exit: exit code 1: .*lattice allocation failed/);
    expect(r.report!.files).toEqual([]);
  }, 60_000);

  it("replays a run beneath a frozen manuscript (the run row is frozen; the replay is recorded beside it)", async () => {
    await cluster.update(clusterFields(good));
    const ensemble = (await db().Ensemble.findByPk(run.ensembleId))!;
    const piUser = await makeUser("pi", (await db().Group.findByPk(ensemble.groupId))!);
    const pi = (await loadIdentity(piUser.id, "session"))!;
    const ms = await createManuscript(audit, pi, { groupId: ensemble.groupId, title: "Replay beneath a freeze" });
    await addExhibit(audit, pi, ms.id, { label: "Table 1", kind: "table", query: { ensembleIds: [ensemble.id], observable: "e", scope: "run" } });
    await freezeManuscript(audit, pi, ms.id);
    expect(await isRunFrozen(run.id)).toBe(true);
    const r = await replay();
    expect(r.state, JSON.stringify(r.report?.differences)).toBe("identical");
  }, 60_000);

  it("refuses a replay of a run that is not done, and returns the open replay instead of queuing a second", async () => {
    const { id } = await requestReplay(audit, who, run.id);
    expect(await requestReplay(audit, who, run.id)).toEqual({ id, created: false });
    await db().sequelize.query(`UPDATE provenance.replays SET state = 'failed' WHERE id = $1`, { bind: [id] });
    const ensemble = (await db().Ensemble.findByPk(run.ensembleId))!;
    const { runs } = await makeEnsemble({ owner: (await db().User.findByPk(ensemble.ownerId))!, group: (await db().Group.findByPk(ensemble.groupId))!, cluster, points: [{ L: 4, T: 2 }], replicas: 1 });
    await expect(requestReplay(audit, who, runs[0].id)).rejects.toThrow(/is queued: only a done run can be replayed/);
  });
});

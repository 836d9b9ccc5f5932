/**
 * Dispatch: time from submitting a 1,000-run ensemble to all 1,000 runs dispatched on a fake
 * node over real SSH, and SSH round trips per run (exec calls + SFTP calls, the adapter's
 * connection.roundTrips). Usage:
 *   node --conditions=react-server --import tsx bench/dispatch.ts [runs=1000] [reps=3]
 * Needs the project's PostgreSQL with the migrated template database (ERGODEX_PG_TEMPLATE_DB,
 * default ergodex_template); each repetition works in a throwaway clone of it and a fresh fake
 * node whose "sampler" only sleeps (slot limit 1), so the samplers cost nothing and the figure is
 * the broker's: submitEnsemble (one transaction) + the cycle's dispatch passes (tokens,
 * run.json staging over SFTP, batched submit, dispatched transitions). Not part of the tests.
 */
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import crypto from "node:crypto";

const runs = Number(process.argv[2] ?? 1000);
const reps = Number(process.argv[3] ?? 3);
if (!(Number.isInteger(runs) && runs >= 10 && runs % 10 === 0 && Number.isInteger(reps) && reps >= 1)) {
  console.error("usage: bench/dispatch.ts [runs: a multiple of 10, >= 10] [reps >= 1]");
  process.exit(2);
}
const scratch = fs.mkdtempSync(path.join(os.tmpdir(), "ergodex-bench-dispatch-"));
process.env.ERGODEX_DATA_DIR = path.join(scratch, "data");
process.env.ERGODEX_KEY_ENCRYPTION_KEY ??= crypto.randomBytes(32).toString("base64url");
process.env.LOG_LEVEL ??= "warn";

const { default: pg } = await import("pg");
const ssh2 = (await import("ssh2")).default;
const { databaseUrl, env } = await import("@/lib/env");
const { createSequelize, setSequelize } = await import("@/lib/db/sequelize");
const { initModels } = await import("@/models");
const { startFakeCluster } = await import("@/cluster-fake/server/server");
const { authorizedKeysPath } = await import("@/cluster-fake/server/keys");
const { sshKeyFingerprint } = await import("@/broker/adapters/fake-cluster-adapter");
const { sealSecret } = await import("@/lib/crypto/secret-box");
const { SAMPLER_CATALOG } = await import("@/lib/samplers/schemas");
const { parseSpec } = await import("@/lib/spec");
const { submitEnsemble } = await import("@/lib/ensembles/submit-ensemble");
const { loadIdentity } = await import("@/lib/auth/identity");
const { adapterFor, closeAdapters } = await import("@/lib/clusters/adapter-for");
const { serveCluster } = await import("@/broker/pipeline/cycle");
const { stopBoss } = await import("@/lib/queue/boss");
const { log } = await import("@/lib/log");

async function admin(sql: string) {
  const c = new pg.Client({ connectionString: databaseUrl("postgres") });
  await c.connect();
  try { await c.query(sql); } finally { await c.end(); }
}

type Figures = { submitMs: number; dispatchMs: number; totalMs: number; roundTrips: number; execCalls: number; sftpOps: number; passes: number };

async function once(rep: number): Promise<Figures> {
  const dbName = `ergodex_bench_${crypto.randomBytes(4).toString("hex")}`;
  await admin(`CREATE DATABASE "${dbName}" TEMPLATE "${env.testTemplateDb}"`);
  const sequelize = createSequelize(databaseUrl(dbName), { poolMax: 8 });
  const previous = setSequelize(sequelize);
  const m = initModels(sequelize);
  const stateDir = fs.mkdtempSync(path.join(scratch, `node-${rep}-`));
  // ssh2 now and then writes an ed25519 key its own parser refuses (a lost leading zero byte): draw again.
  let pair = ssh2.utils.generateKeyPairSync("ed25519");
  while (ssh2.utils.parseKey(pair.private) instanceof Error) pair = ssh2.utils.generateKeyPairSync("ed25519");
  fs.writeFileSync(authorizedKeysPath(stateDir), `${pair.public}\n`);
  const node = await startFakeCluster({ port: 0, stateDir, slots: 1, samplerCommand: ["sleep", "600"], killGraceMs: 200 });
  try {
    const group = await m.Group.create({ slug: `bench-${rep}`, name: "Bench", institute: "Bench" });
    const user = await m.User.create({ email: `bench${rep}@bench.example`, name: "Bench", role: "researcher", passwordHash: null });
    await m.Membership.create({ userId: user.id, groupId: group.id, isLead: false });
    const day = 86_400_000;
    const allocation = await m.Allocation.create({ groupId: group.id, name: "bench", periodStart: new Date(Date.now() - day), periodEnd: new Date(Date.now() + 30 * day) });
    await m.LedgerEntry.create({ allocationId: allocation.id, kind: "grant", coreHours: 1e6, note: "bench" });
    const s = SAMPLER_CATALOG.ising2d;
    await m.Sampler.create({ name: s.name, version: s.version, command: "npm run sampler -- ising2d", paramsSchema: s.paramsSchema as Record<string, unknown>, observables: [...s.observables] });
    const cluster = await m.Cluster.create({
      name: "bench", kind: "fake-ssh", host: "127.0.0.1", port: node.port, username: "ergodex",
      hostKeyFingerprint: sshKeyFingerprint(node.hostPublicKey), privateKeyEncrypted: sealSecret(pair.private),
      workDir: node.options.workRoot, slotLimit: runs,
    });
    const spec = parseSpec({
      format: "ergodex.ensemble/1", name: "bench dispatch", sampler: { name: "ising2d", version: s.version },
      fixed: { L: 8, algorithm: "metropolis" }, scan: [{ param: "T", linear: { from: 1.5, to: 3.5, points: runs / 10 } }],
      replicas: 10, thermalization: 100, measurements: 1000, interval: 1, seed: "1",
      resources: { cores: 1, wallMinutes: 10, memoryMb: 256 }, cluster: "bench", allocation: "bench",
    });
    const who = (await loadIdentity(user.id, "session"))!;

    const t0 = performance.now();
    const sub = await submitEnsemble({ actorId: user.id, ip: null, requestId: "bench" }, who, spec);
    const t1 = performance.now();
    let passes = 0;
    while ((await m.Run.count({ where: { ensembleId: sub.ensembleId, state: "queued" } })) > 0) {
      passes++;
      await serveCluster(cluster, log);
      if (passes > 20) throw new Error("runs still queued after 20 dispatch passes");
    }
    const t2 = performance.now();
    const dispatched = await m.Run.count({ where: { ensembleId: sub.ensembleId, state: "dispatched" } });
    if (dispatched !== runs) throw new Error(`only ${dispatched} of ${runs} runs dispatched`);
    const stats = adapterFor(cluster).connection.stats;
    return {
      submitMs: t1 - t0, dispatchMs: t2 - t1, totalMs: t2 - t0,
      roundTrips: stats.execCalls + stats.sftpOps, execCalls: stats.execCalls, sftpOps: stats.sftpOps, passes,
    };
  } finally {
    await closeAdapters();
    await stopBoss({ graceful: false });
    await node.close();
    setSequelize(previous);
    await sequelize.close();
    await admin(`DROP DATABASE IF EXISTS "${dbName}" WITH (FORCE)`);
  }
}

const all: Figures[] = [];
for (let r = 0; r < reps; r++) {
  const f = await once(r);
  all.push(f);
  console.log(`rep ${r + 1}: submit ${f.submitMs.toFixed(0)} ms, dispatch ${f.dispatchMs.toFixed(0)} ms (${f.passes} passes), submit→all dispatched ${f.totalMs.toFixed(0)} ms; ` +
    `round trips ${f.roundTrips} (${f.execCalls} exec + ${f.sftpOps} sftp) = ${(f.roundTrips / runs).toFixed(2)} per run`);
}
const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];
console.log(`\n${runs} runs, median of ${reps}: submit→all dispatched ${median(all.map((f) => f.totalMs)).toFixed(0)} ms ` +
  `(${(median(all.map((f) => f.totalMs)) / runs).toFixed(2)} ms per run), SSH round trips per run ${(median(all.map((f) => f.roundTrips)) / runs).toFixed(2)}`);
fs.rmSync(scratch, { recursive: true, force: true });
process.exit(0);

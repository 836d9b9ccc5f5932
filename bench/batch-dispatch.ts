/**
 * Batch scheduler vs fake cluster: time from submit to all runs started for a 200-run batch,
 * and scheduler calls (and SSH round trips) per run, both through their ClusterAdapter over
 * real SSH in the same process. Usage (root on Debian, starts the loopback scheduler itself):
 *   node --import tsx bench/batch-dispatch.ts [runs=200] [reps=2]
 * The "sampler" is /bin/true on both sides, so the figures are the dispatch path's, not the
 * chains': staging (SFTP), one submission (a job array / one `submit` exec), then status every
 * second (the test cluster's query interval) until every run is running or finished. Both have
 * as many slots as the machine has cores. Not part of the tests.
 *
 * Measured (2 shared cores under load from other users, 200 runs, 1 rep): batch scheduler
 * submit→all started 89 s, 1 sbatch + 35 squeue = 0.18 scheduler calls per run, 2.4 SSH round
 * trips per run; fake cluster 2.3 s, 4 node calls = 0.02 per run, 2.0 round trips per run. With
 * the scheduler's default batch_sched_delay (3 s) the same batch took 273 s (0.58 calls per run).
 * The scheduler fills freed slots about once a second (see slurmctld.log), ~0.45 s per task on two
 * slots; squeue calls grow with the time the runs take to start (one per poll), sbatch is one per array.
 */
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { randomUUID } from "node:crypto";
import ssh2 from "ssh2";
import { startFakeCluster } from "@/cluster-fake/server/server";
import { authorizedKeysPath } from "@/cluster-fake/server/keys";
import { FakeClusterAdapter, sshKeyFingerprint } from "@/broker/adapters/fake-cluster-adapter";
import type { ClusterAdapter } from "@/broker/adapters/types";
import { batchAdapter, isingRun, startBatchCluster, stopBatchCluster } from "@/tests/integration/batch-cluster/harness";

const runs = Number(process.argv[2] ?? 200);
const reps = Number(process.argv[3] ?? 2);
if (!(Number.isInteger(runs) && runs >= 1 && runs <= 1000 && Number.isInteger(reps) && reps >= 1)) {
  console.error("usage: bench/batch-dispatch.ts [runs 1..1000] [reps >= 1]");
  process.exit(2);
}
const RES = { cores: 1, wallSeconds: 600, memoryMb: 64 };
const STARTED = new Set(["running", "exited", "timed_out", "cancelled", "lost"]);

interface Figures { stageMs: number; startMs: number; polls: number }

/** Stage, submit, then poll once a second until every run has started. */
async function measure(a: ClusterAdapter): Promise<Figures> {
  const ids = Array.from({ length: runs }, () => randomUUID());
  const t0 = performance.now();
  await a.stage(ids.map((id) => ({ runId: id, runJson: isingRun(id) })));
  const t1 = performance.now();
  const sub = await a.submit(ids.map((id) => ({ runId: id, dispatchToken: randomUUID(), resources: RES })));
  const refused = sub.filter((s) => !s.accepted);
  if (refused.length) throw new Error(`${refused.length} runs refused: ${JSON.stringify(refused[0])}`);
  let polls = 0;
  for (;;) {
    polls++;
    const s = await a.status(ids);
    if (s.every((x) => STARTED.has(x.state))) break;
    if (performance.now() - t1 > 600_000) throw new Error("runs not all started after 10 minutes");
    await new Promise((r) => setTimeout(r, 1000));
  }
  return { stageMs: t1 - t0, startMs: performance.now() - t1, polls };
}

const started = startBatchCluster();
if (!("conn" in started)) {
  console.error(`cannot start the loopback scheduler: ${started.skip}`);
  process.exit(1);
}
const scratch = fs.mkdtempSync(path.join(os.tmpdir(), "ergodex-bench-batch-"));
const cores = started.conn.cpus;
try {
  for (let r = 0; r < reps; r++) {
    const batch = batchAdapter(started.conn, { samplerCommand: "/bin/true" });
    const b = await measure(batch);
    const calls = batch.schedulerCalls;
    const sched = calls.squeue + calls.sbatch + calls.scancel + calls.sinfo;
    await batch.close();

    const stateDir = fs.mkdtempSync(path.join(scratch, "fake-"));
    const pair = ssh2.utils.generateKeyPairSync("ed25519");
    fs.writeFileSync(authorizedKeysPath(stateDir), `${pair.public}\n`);
    const node = await startFakeCluster({ port: 0, stateDir, slots: cores, samplerCommand: ["/bin/true"], killGraceMs: 200 });
    const fake = new FakeClusterAdapter({ host: "127.0.0.1", port: node.port, username: "ergodex", privateKey: pair.private, hostKeyFingerprint: sshKeyFingerprint(node.hostPublicKey) });
    const f = await measure(fake);
    const fakeExec = fake.connection.stats.execCalls;
    const fakeTrips = fake.connection.roundTrips;
    await fake.close();
    await node.close();

    console.log(`rep ${r + 1}, ${runs} runs, ${cores} slots:`);
    console.log(`  batch scheduler: stage ${b.stageMs.toFixed(0)} ms, submit→all started ${b.startMs.toFixed(0)} ms (${b.polls} polls); ` +
      `scheduler calls ${sched} (${calls.sbatch} sbatch, ${calls.squeue} squeue) = ${(sched / runs).toFixed(3)} per run; SSH round trips ${batch.connection.roundTrips} = ${(batch.connection.roundTrips / runs).toFixed(2)} per run`);
    console.log(`  fake cluster:    stage ${f.stageMs.toFixed(0)} ms, submit→all started ${f.startMs.toFixed(0)} ms (${f.polls} polls); ` +
      `node protocol calls ${fakeExec} = ${(fakeExec / runs).toFixed(3)} per run; SSH round trips ${fakeTrips} = ${(fakeTrips / runs).toFixed(2)} per run`);
  }
} finally {
  stopBatchCluster();
  fs.rmSync(scratch, { recursive: true, force: true });
}
process.exit(0);

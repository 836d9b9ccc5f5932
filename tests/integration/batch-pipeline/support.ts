// The broker's pipeline against the real scheduler: a loopback batch cluster of its own (state
// dir and ports apart from the batch-cluster suite's, so both files can run at once), Cluster rows
// of kind "batch-ssh" pinned to its host key, and the scheduler's own view of the jobs, read over
// the same SSH login the adapter uses.
import fs from "node:fs";
import path from "node:path";
import { execFileSync } from "node:child_process";
import { SshConnection } from "@/broker/adapters/ssh-connection";
import { ARRAYS_DIR } from "@/broker/adapters/batch-script";
import { sealSecret } from "@/lib/crypto/secret-box";
import { db, type Cluster } from "@/models";
import { KEK } from "@/tests/integration/broker/support";
import type { BatchConnection } from "@/tests/integration/batch-cluster/harness";

const ROOT = path.resolve(import.meta.dirname, "../../..");
const SCRIPTS = path.join(ROOT, "scripts/batch-cluster");

/**
 * This suite's own cluster: state dir, ports, scheduler cluster name, node name and cluster user.
 * Its own user matters: start.sh installs its state dir's client key as that user's whole
 * authorized_keys, so two suites sharing a user would lock each other out.
 */
export const PIPELINE_ENV = {
  ERGODEX_BATCH_USER: "ergodex-pipe",
  ERGODEX_BATCH_STATE_DIR: path.join(ROOT, ".data/batch-cluster-pipeline"),
  ERGODEX_BATCH_SSH_PORT: "2424",
  ERGODEX_BATCH_CTLD_PORT: "6857",
  ERGODEX_BATCH_SLURMD_PORT: "6858",
  ERGODEX_BATCH_CLUSTER_NAME: "ergodex-pipe",
  ERGODEX_BATCH_NODE: "ergodex-p1",
};

/** Start the scheduler + login node (scripts/batch-cluster/start.sh), or say why not. */
export function startPipelineCluster(): { conn: BatchConnection } | { skip: string } {
  if (process.getuid?.() !== 0) return { skip: "not running as root: the scheduler's daemons are root-started" };
  if (!fs.existsSync("/etc/debian_version")) return { skip: "not a Debian system: start.sh installs the daemons with apt-get" };
  try {
    execFileSync("bash", [path.join(SCRIPTS, "start.sh")], { env: { ...process.env, ...PIPELINE_ENV }, stdio: ["ignore", "pipe", "pipe"], timeout: 600_000 });
  } catch (e) {
    const err = e as { stderr?: Buffer; message: string };
    return { skip: `scripts/batch-cluster/start.sh failed: ${(err.stderr?.toString() || err.message).trim().split("\n").slice(-5).join(" | ")}` };
  }
  return { conn: JSON.parse(fs.readFileSync(path.join(PIPELINE_ENV.ERGODEX_BATCH_STATE_DIR, "connection.json"), "utf8")) as BatchConnection };
}

/** Stop what startPipelineCluster started (stop.sh stops by PID). */
export function stopPipelineCluster(): void {
  execFileSync("bash", [path.join(SCRIPTS, "stop.sh")], { env: { ...process.env, ...PIPELINE_ENV }, stdio: "ignore", timeout: 120_000 });
}

/**
 * A batch-ssh Cluster row for the loopback cluster: pinned host key (or `fingerprint`), the client
 * key sealed with the broker's key-encryption key, and test-speed settings (1 s listings and
 * submissions; real clusters default to 60 s and 5 s).
 */
export async function makeBatchClusterRow(c: BatchConnection, o: { name: string; fingerprint?: string; slotLimit?: number; settings?: Record<string, unknown> }): Promise<Cluster> {
  return db().Cluster.create({
    name: o.name, kind: "batch-ssh", host: c.host, port: c.port, username: c.user,
    hostKeyFingerprint: o.fingerprint ?? c.hostKeyFingerprint,
    privateKeyEncrypted: sealSecret(fs.readFileSync(c.privateKeyPath, "utf8"), KEK),
    workDir: c.workRoot, slotLimit: o.slotLimit ?? 4,
    settings: {
      partition: c.partition, prelude: 'echo "prelude: $ERGODEX_RUN_ID"', samplerCommand: c.samplerCommand,
      pollSeconds: 1, submitSeconds: 1, ...o.settings,
    },
  });
}

/** An SSH login as the cluster user, the same key and pinned host key the adapter uses. */
export function login(c: BatchConnection): SshConnection {
  return new SshConnection({
    host: c.host, port: c.port, username: c.user, privateKey: fs.readFileSync(c.privateKeyPath), hostKeyFingerprint: c.hostKeyFingerprint,
    reconnect: { maxAttempts: 2, initialDelayMs: 100 },
  });
}

/** Jobs the scheduler still holds as pending, running, completing or suspended (`id name state`). */
export async function activeJobs(ssh: SshConnection, user: string): Promise<string[]> {
  const r = await ssh.exec(`squeue --noheader --user=${user} --states=PENDING,RUNNING,COMPLETING,SUSPENDED,CONFIGURING --format='%i %j %T'`);
  if (r.code !== 0) throw new Error(`squeue failed (${r.code}): ${r.stderr}`);
  return r.stdout.split("\n").map((l) => l.trim()).filter(Boolean);
}

/**
 * How many array tasks the scheduler actually started for each run: every task that starts writes
 * `<i>.out` in its array's folder, and line i of that array's tasks.tsv names its run. Read from
 * the local file system (the loopback cluster's work root is on this machine).
 */
export function tasksStartedPerRun(workRoot: string, runIds: string[]): Record<string, number> {
  const counts: Record<string, number> = Object.fromEntries(runIds.map((id) => [id, 0]));
  const arrays = path.join(workRoot, ARRAYS_DIR);
  if (!fs.existsSync(arrays)) return counts;
  for (const group of fs.readdirSync(arrays)) {
    const dir = path.join(arrays, group);
    const tsv = path.join(dir, "tasks.tsv");
    if (!fs.existsSync(tsv)) continue;
    for (const line of fs.readFileSync(tsv, "utf8").split("\n").filter(Boolean)) {
      const [index, runId] = line.split("\t");
      if (runId in counts && fs.existsSync(path.join(dir, `${index}.out`))) counts[runId]++;
    }
  }
  return counts;
}

/** Stdout of every array task that carried `runId` (the task's `<i>.out`). */
export function taskOutputs(workRoot: string, runId: string): string[] {
  const arrays = path.join(workRoot, ARRAYS_DIR);
  const out: string[] = [];
  for (const group of fs.existsSync(arrays) ? fs.readdirSync(arrays) : []) {
    const tsv = path.join(arrays, group, "tasks.tsv");
    if (!fs.existsSync(tsv)) continue;
    for (const line of fs.readFileSync(tsv, "utf8").split("\n").filter(Boolean)) {
      const [index, id] = line.split("\t");
      const file = path.join(arrays, group, `${index}.out`);
      if (id === runId && fs.existsSync(file)) out.push(fs.readFileSync(file, "utf8"));
    }
  }
  return out;
}

/** A sampler command on the cluster that fails like a broken code: one stderr line, exit 1, no bundle. */
export async function installFailingSampler(ssh: SshConnection, c: BatchConnection): Promise<string> {
  const file = path.posix.join(path.posix.dirname(c.workRoot), "fixtures", "failing-sampler.sh");
  const script = "#!/bin/sh\necho \"sampler: lattice allocation failed: out of memory at sweep 0 (fixture)\" >&2\nexit 1\n";
  const r = await ssh.exec(`mkdir -p ${path.posix.dirname(file)} && base64 -d > ${file} && chmod 755 ${file}`, { stdin: Buffer.from(script).toString("base64") });
  if (r.code !== 0) throw new Error(`could not install the failing sampler: ${r.stderr}`);
  return file;
}

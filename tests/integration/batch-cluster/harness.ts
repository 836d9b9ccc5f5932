import fs from "node:fs";
import path from "node:path";
import { execFileSync } from "node:child_process";
import { BatchSchedulerAdapter, type BatchAdapterOptions } from "@/broker/adapters/batch-adapter";
import type { ClusterRunState, RunStatus } from "@/broker/adapters/types";

/** What scripts/batch-cluster/start.sh writes to <state>/connection.json. */
export interface BatchConnection {
  host: string;
  port: number;
  user: string;
  privateKeyPath: string;
  hostKeyFingerprint: string;
  partition: string;
  cpus: number;
  workRoot: string;
  samplerCommand: string;
}

const ROOT = path.resolve(import.meta.dirname, "../../..");
const SCRIPTS = path.join(ROOT, "scripts/batch-cluster");

/** The test cluster's own ports and state dir, apart from a developer's `start.sh` defaults. */
export const TEST_ENV = {
  ERGODEX_BATCH_STATE_DIR: path.join(ROOT, ".data/batch-cluster-test"),
  ERGODEX_BATCH_SSH_PORT: "2423",
  ERGODEX_BATCH_CTLD_PORT: "6847",
  ERGODEX_BATCH_SLURMD_PORT: "6848",
  ERGODEX_BATCH_CLUSTER_NAME: "ergodex-ci",
};

/**
 * Start the real scheduler + login node, or say why not. Runs at collection time so that the
 * suite can be skipped (describe.skipIf) with the reason printed.
 */
export function startBatchCluster(): { conn: BatchConnection } | { skip: string } {
  if (process.getuid?.() !== 0) return { skip: "not running as root: the scheduler's daemons are root-started" };
  if (!fs.existsSync("/etc/debian_version")) return { skip: "not a Debian system: start.sh installs the daemons with apt-get" };
  try {
    execFileSync("bash", [path.join(SCRIPTS, "start.sh")], { env: { ...process.env, ...TEST_ENV }, stdio: ["ignore", "pipe", "pipe"], timeout: 600_000 });
  } catch (e) {
    const err = e as { stderr?: Buffer; message: string };
    return { skip: `scripts/batch-cluster/start.sh failed: ${(err.stderr?.toString() || err.message).trim().split("\n").slice(-5).join(" | ")}` };
  }
  return { conn: JSON.parse(fs.readFileSync(path.join(TEST_ENV.ERGODEX_BATCH_STATE_DIR, "connection.json"), "utf8")) as BatchConnection };
}

/** Stop what startBatchCluster started (by PID, through stop.sh). */
export function stopBatchCluster(): void {
  execFileSync("bash", [path.join(SCRIPTS, "stop.sh")], { env: { ...process.env, ...TEST_ENV }, stdio: "ignore", timeout: 120_000 });
}

/** An adapter on the test cluster; the query interval is 1 s here, 60 s by default. */
export function batchAdapter(c: BatchConnection, o: Partial<BatchAdapterOptions> = {}): BatchSchedulerAdapter {
  return new BatchSchedulerAdapter({
    host: c.host, port: c.port, username: c.user, privateKey: fs.readFileSync(c.privateKeyPath), hostKeyFingerprint: c.hostKeyFingerprint,
    workRoot: c.workRoot, samplerCommand: c.samplerCommand, partition: c.partition,
    queryIntervalMs: 1000, submitIntervalMs: 200, reconnect: { maxAttempts: 2, initialDelayMs: 100 }, ...o,
  });
}

/** run.json for an ising2d chain. */
export function isingRun(runId: string, o: { L?: number; T?: number; seed?: string; thermalization?: number; measurements?: number; interval?: number } = {}) {
  return {
    format: "ergodex.run/1", runId, sampler: { name: "ising2d", version: "1.0.0" },
    params: { L: o.L ?? 8, T: o.T ?? 2.3, algorithm: "metropolis" }, seed: o.seed ?? "12345",
    thermalization: o.thermalization ?? 200, measurements: o.measurements ?? 500, interval: o.interval ?? 1,
  };
}

export const TERMINAL: ReadonlySet<ClusterRunState> = new Set(["exited", "timed_out", "cancelled", "lost", "unknown"]);

/** Poll status (the adapter's own interval applies) until every run is in a terminal state. */
export async function waitTerminal(a: BatchSchedulerAdapter, runIds: string[], timeoutMs: number): Promise<RunStatus[]> {
  const end = Date.now() + timeoutMs;
  for (;;) {
    const s = await a.status(runIds);
    if (s.every((x) => TERMINAL.has(x.state))) return s;
    if (Date.now() > end) throw new Error(`runs not finished after ${timeoutMs} ms: ${s.map((x) => `${x.runId}=${x.state}`).join(", ")}`);
    await new Promise((r) => setTimeout(r, 500));
  }
}

// Shared pieces of the broker integration tests: a real fake node on a random port, a cluster row
// pinned to its host key with an encrypted client key, a fake SMTP store, people and an allocation,
// submission through the real submitEnsemble, and the broker as a child process (so it can be killed).
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import net from "node:net";
import crypto from "node:crypto";
import { spawn, type ChildProcess } from "node:child_process";
import ssh2 from "ssh2";
import { QueryTypes } from "sequelize";
import { startFakeCluster, type FakeCluster } from "@/cluster-fake/server/server";
import type { FakeClusterOptions } from "@/cluster-fake/server/config";
import { authorizedKeysPath } from "@/cluster-fake/server/keys";
import { sshKeyFingerprint } from "@/broker/adapters/fake-cluster-adapter";
import { sealSecret } from "@/lib/crypto/secret-box";
import { startMailStore, type MailStore } from "@/lib/mail/mail-store-server";
import { parseSpec } from "@/lib/spec";
import { submitEnsemble } from "@/lib/ensembles/submit-ensemble";
import { loadIdentity } from "@/lib/auth/identity";
import { SAMPLER_CATALOG } from "@/lib/samplers/schemas";
import { db, type Cluster, type User } from "@/models";
import { makeAllocation, makeGroup, makeUser, type TestDatabase } from "@/tests/support/db";

const ROOT = path.resolve(import.meta.dirname, "..", "..", "..");
/** One key-encryption key shared by the test (sealing) and the broker child (opening). */
export const KEK = crypto.randomBytes(32);

const made: string[] = [];

/** A temp dir, removed by removeTempDirs(). */
export function tempDir(prefix: string): string {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), `ergodex-${prefix}-`));
  made.push(dir);
  return dir;
}

/** Remove every temp dir this file made (call after the nodes and the broker have stopped). */
export function removeTempDirs(): void {
  for (const dir of made.splice(0)) fs.rmSync(dir, { recursive: true, force: true });
}

/** A free TCP port on loopback. */
export function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const s = net.createServer();
    s.once("error", reject);
    s.listen(0, "127.0.0.1", () => {
      const { port } = s.address() as net.AddressInfo;
      s.close(() => resolve(port));
    });
  });
}

/**
 * An ed25519 pair that ssh2 can read back. ssh2's generateKeyPairSync now and then (about 1 in 400)
 * writes a key whose public half lost a leading zero byte, which its own parseKey then refuses.
 */
export function clientKeyPair(): { private: string; public: string } {
  for (;;) {
    const pair = ssh2.utils.generateKeyPairSync("ed25519");
    const parsed = ssh2.utils.parseKey(pair.private);
    if (!(parsed instanceof Error)) return pair;
  }
}

/** A fake node with one authorized client key (returned), on a random port. */
export async function startNode(o: FakeClusterOptions = {}): Promise<{ node: FakeCluster; clientKey: string; stateDir: string }> {
  const stateDir = tempDir("node");
  const pair = clientKeyPair();
  fs.writeFileSync(authorizedKeysPath(stateDir), `# broker test client\n${pair.public}\n`);
  const node = await startFakeCluster({ port: 0, stateDir, killGraceMs: 2000, slots: 2, ...o });
  return { node, clientKey: pair.private, stateDir };
}

/** A cluster row for `node`, pinned to its host key (or to `fingerprint`), with the client key sealed. */
export async function makeClusterRow(node: FakeCluster, clientKey: string, o: { name?: string; fingerprint?: string; slotLimit?: number; settings?: Record<string, unknown> } = {}): Promise<Cluster> {
  return db().Cluster.create({
    name: o.name ?? `fake-${crypto.randomBytes(3).toString("hex")}`, kind: "fake-ssh", host: "127.0.0.1", port: node.port,
    username: "ergodex", hostKeyFingerprint: o.fingerprint ?? sshKeyFingerprint(node.hostPublicKey),
    privateKeyEncrypted: sealSecret(clientKey, KEK), workDir: node.options.workRoot, slotLimit: o.slotLimit ?? 4,
    settings: o.settings ?? {},
  });
}

/** The real ising2d (and other) sampler rows, as the seed writes them. */
export async function makeCatalogSamplers(): Promise<void> {
  for (const s of Object.values(SAMPLER_CATALOG)) {
    await db().Sampler.findOrCreate({
      where: { name: s.name, version: s.version },
      defaults: { name: s.name, version: s.version, command: `npm run sampler -- ${s.name}`, paramsSchema: s.paramsSchema as Record<string, unknown>, observables: [...s.observables], description: s.description },
    });
  }
}

/** A researcher with an allocation in their group, plus an admin and a coordinator to receive cluster alerts. */
export async function makePeople(grant = 1000): Promise<{ researcher: User; admin: User; coordinator: User; allocationName: string }> {
  const group = await makeGroup();
  const researcher = await makeUser("researcher", group);
  const admin = await makeUser("admin");
  const coordinator = await makeUser("coordinator");
  const allocation = await makeAllocation(group, grant);
  return { researcher, admin, coordinator, allocationName: allocation.name };
}

/** A tiny ising2d spec on `cluster`; override any field. */
export function isingSpec(cluster: string, allocation: string, over: Record<string, unknown> = {}) {
  return {
    format: "ergodex.ensemble/1", name: `broker test ${crypto.randomBytes(3).toString("hex")}`,
    sampler: { name: "ising2d", version: SAMPLER_CATALOG.ising2d.version },
    fixed: { L: 8, algorithm: "metropolis" }, scan: [{ param: "T", values: [2.0, 2.3, 2.6] }],
    replicas: 2, thermalization: 100, measurements: 400, interval: 1, seed: "20251201",
    resources: { cores: 1, wallMinutes: 5, memoryMb: 256 }, cluster, allocation,
    ...over,
  };
}

/** Submit through the real submission path (parseSpec → submitEnsemble). */
export async function submit(user: User, spec: Record<string, unknown>) {
  const who = await loadIdentity(user.id, "session");
  if (!who) throw new Error("test user has no identity");
  return submitEnsemble({ actorId: user.id, ip: null, requestId: "broker-test" }, who, parseSpec(spec));
}

/** The broker as a child process against the test database. */
export class BrokerProcess {
  child: ChildProcess | null = null;
  readonly logFile: string;
  starts = 0;
  constructor(readonly t: TestDatabase, readonly opts: { dataDir: string; smtpPort: number; healthPort: number; extraEnv?: Record<string, string> }) {
    this.logFile = path.join(opts.dataDir, "broker.log");
  }

  /** Start it and wait for its ready line. */
  async start(): Promise<void> {
    this.starts++;
    const out = fs.openSync(this.logFile, "a");
    const child = spawn(process.execPath, ["--conditions=react-server", "--import", "tsx", "broker/index.ts"], {
      cwd: ROOT, stdio: ["ignore", "pipe", out],
      env: {
        ...process.env, ERGODEX_PG_DB: this.t.name, ERGODEX_BROKER_PORT: String(this.opts.healthPort), ERGODEX_DATA_DIR: this.opts.dataDir,
        ERGODEX_DIGEST_SECONDS: "2", ERGODEX_POLL_SECONDS: "1", ERGODEX_SMTP_PORT: String(this.opts.smtpPort),
        ERGODEX_KEY_ENCRYPTION_KEY: KEK.toString("base64url"), ERGODEX_SHUTDOWN_SECONDS: "5", LOG_LEVEL: "info",
        NEXTAUTH_URL: "http://127.0.0.1:3999", ...this.opts.extraEnv,
      },
    });
    this.child = child;
    await new Promise<void>((resolve, reject) => {
      let buf = "";
      const timer = setTimeout(() => reject(new Error(`broker did not start; log: ${this.tail()}`)), 60_000);
      child.stdout!.on("data", (d: Buffer) => {
        fs.appendFileSync(this.logFile, d);
        buf += d.toString();
        if (buf.includes("broker ready")) { clearTimeout(timer); resolve(); }
      });
      child.once("exit", (code) => { clearTimeout(timer); reject(new Error(`broker exited ${code} during start; log: ${this.tail()}`)); });
    });
    fs.closeSync(out);
  }

  /** SIGKILL: no chance to clean up. */
  async kill(): Promise<void> {
    const c = this.child;
    if (!c || c.exitCode !== null || c.signalCode !== null) return;
    await new Promise<void>((resolve) => { c.once("exit", () => resolve()); c.kill("SIGKILL"); });
    this.child = null;
  }

  /** SIGTERM and wait for the graceful exit; resolves to the exit code. */
  async stop(): Promise<number | null> {
    const c = this.child;
    if (!c || c.exitCode !== null || c.signalCode !== null) return c?.exitCode ?? null;
    const code = await new Promise<number | null>((resolve) => { c.once("exit", (code) => resolve(code)); c.kill("SIGTERM"); });
    this.child = null;
    return code;
  }

  /** GET /health. */
  async health(): Promise<{ status: string; queues: Record<string, Record<string, number>>; clusters: { name: string; healthy: boolean; healthNote: string | null }[] }> {
    const res = await fetch(`http://127.0.0.1:${this.opts.healthPort}/health`);
    return res.json();
  }

  tail(lines = 40): string {
    try { return fs.readFileSync(this.logFile, "utf8").trimEnd().split("\n").slice(-lines).join("\n"); } catch { return "(no log)"; }
  }
}

/** A fake SMTP store on a random port. */
export async function startSmtp(): Promise<MailStore> {
  return startMailStore({ port: 0, mailDir: tempDir("mail") });
}

/** Wait until pred() holds; the deadline only guards against a hang (not a timing assertion). */
export async function waitFor<T>(what: string, fn: () => Promise<T>, pred: (v: T) => boolean, deadlineMs = 60_000, broker?: BrokerProcess): Promise<T> {
  const until = Date.now() + deadlineMs;
  let last: T | undefined;
  while (Date.now() < until) {
    last = await fn();
    if (pred(last)) return last;
    await new Promise((r) => setTimeout(r, 250));
  }
  throw new Error(`${what}: not reached; last ${JSON.stringify(last)}${broker ? `\nbroker log:\n${broker.tail()}` : ""}`);
}

/** Run states of an ensemble, counted. */
export async function stateCounts(ensembleId: string): Promise<Record<string, number>> {
  const rows = await db().sequelize.query<{ state: string; n: string }>(
    "SELECT state, count(*) AS n FROM runs WHERE ensemble_id = $1 GROUP BY state", { bind: [ensembleId], type: QueryTypes.SELECT });
  return Object.fromEntries(rows.map((r) => [r.state, Number(r.n)]));
}

/** Σ of each ledger kind over an ensemble's entries. */
export async function ledgerOf(ensembleId: string): Promise<Record<string, number>> {
  const rows = await db().sequelize.query<{ kind: string; s: string }>(
    "SELECT kind, sum(core_hours) AS s FROM ledger_entries WHERE ensemble_id = $1 GROUP BY kind", { bind: [ensembleId], type: QueryTypes.SELECT });
  return Object.fromEntries(rows.map((r) => [r.kind, Number(r.s)]));
}

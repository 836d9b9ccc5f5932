import "server-only";
// Cluster row → ClusterAdapter: one adapter (one SSH connection) per cluster, reused by every
// job in the process, rebuilt only when the connection settings change.
//
// This is the one lib/ module that imports from broker/: the adapters are the broker's, and
// the contract puts the Cluster-row-to-adapter step beside the other cluster logic.
import { FakeClusterAdapter } from "@/broker/adapters/fake-cluster-adapter";
import { BatchSchedulerAdapter } from "@/broker/adapters/batch-adapter";
import { HostKeyMismatchError } from "@/broker/adapters/errors";
import type { SshConnection } from "@/broker/adapters/ssh-connection";
import type { ClusterAdapter } from "@/broker/adapters/types";
import { openSecret } from "@/lib/crypto/secret-box";
import { log } from "@/lib/log";
import { alertClusterFault } from "@/lib/mail/cluster-fault";
import { db, type Cluster } from "@/models";
import { env } from "@/lib/env";

type Entry = { key: string; adapter: GuardedAdapter };
const cache = new Map<string, Entry>();

/** Fields whose change means a new adapter (the batch adapter takes its settings at construction). */
const connectionKey = (c: Cluster) => JSON.stringify([c.kind, c.host, c.port, c.username, c.hostKeyFingerprint, c.privateKeyEncrypted, c.workDir,
  ...ADAPTER_SETTINGS.map((k) => c.settings?.[k] ?? null)]);
/** Settings the adapter is built with; the others (maxWallSeconds…) are read per dispatch. */
const ADAPTER_SETTINGS = ["partition", "account", "prelude", "samplerCommand", "pollSeconds", "submitSeconds", "wallSignalSeconds"] as const;

const positive = (v: unknown): boolean => typeof v === "number" && Number.isFinite(v) && v > 0;

/**
 * Wraps an adapter so that a host-key mismatch on any call marks the cluster unhealthy and
 * alerts admins and coordinators before the error goes on to the caller.
 */
export class GuardedAdapter implements ClusterAdapter {
  constructor(readonly clusterId: string, readonly inner: ClusterAdapter & { readonly connection: SshConnection }) {}

  /** The SSH connection, for its round-trip counters. */
  get connection(): SshConnection { return this.inner.connection; }

  private async guard<T>(fn: () => Promise<T>): Promise<T> {
    try {
      return await fn();
    } catch (err) {
      if (err instanceof HostKeyMismatchError) await reportHostKeyMismatch(this.clusterId, err).catch((e) => log.error({ err: e }, "could not record host-key mismatch"));
      throw err;
    }
  }

  stage: ClusterAdapter["stage"] = (runs) => this.guard(() => this.inner.stage(runs));
  submit: ClusterAdapter["submit"] = (runs) => this.guard(() => this.inner.submit(runs));
  status: ClusterAdapter["status"] = (ids) => this.guard(() => this.inner.status(ids));
  fetch: ClusterAdapter["fetch"] = (id, dir) => this.guard(() => this.inner.fetch(id, dir));
  cancel: ClusterAdapter["cancel"] = (ids) => this.guard(() => this.inner.cancel(ids));
  health: ClusterAdapter["health"] = () => this.guard(() => this.inner.health());
  close: ClusterAdapter["close"] = () => this.inner.close();
}

/** A new, uncached adapter for `cluster` (a one-off connection test closes it after use). */
export function buildAdapter(cluster: Cluster): GuardedAdapter {
  const ssh = {
    host: cluster.host, port: cluster.port, username: cluster.username,
    privateKey: openSecret(cluster.privateKeyEncrypted),
    hostKeyFingerprint: cluster.hostKeyFingerprint,
    logger: log,
    reconnect: { initialDelayMs: 250, maxDelayMs: 5_000, maxAttempts: env.isTest ? 3 : 6 },
  };
  const settings = cluster.settings ?? {};
  switch (cluster.kind) {
    case "fake-ssh":
      // The ergodex-node protocol fixes the layout: each run's folder sits at the SFTP root
      // (the node's own work dir, which cluster.workDir names for people).
      return new GuardedAdapter(cluster.id, new FakeClusterAdapter({ ...ssh, workDir: "/" }));
    case "batch-ssh":
      return new GuardedAdapter(cluster.id, new BatchSchedulerAdapter({
        ...ssh, workRoot: cluster.workDir,
        samplerCommand: settings.samplerCommand ?? "node_modules/.bin/tsx cluster-fake/samplers/cli.ts",
        partition: settings.partition ?? null, account: settings.account ?? null, prelude: settings.prelude ?? null,
        ...(settings.pollSeconds ? { queryIntervalMs: settings.pollSeconds * 1000 } : {}),
        ...(positive(settings.submitSeconds) ? { submitIntervalMs: Number(settings.submitSeconds) * 1000 } : {}),
        ...(positive(settings.wallSignalSeconds) ? { wallSignalSeconds: Number(settings.wallSignalSeconds) } : {}),
      }));
    default:
      throw new Error(`cluster ${cluster.name}: no adapter for kind "${String(cluster.kind)}"`);
  }
}

/** The process's adapter for `cluster`, connecting lazily on first use. */
export function adapterFor(cluster: Cluster): GuardedAdapter {
  const key = connectionKey(cluster);
  const known = cache.get(cluster.id);
  if (known && known.key === key) return known.adapter;
  if (known) void known.adapter.close().catch(() => {});
  const adapter = buildAdapter(cluster);
  cache.set(cluster.id, { key, adapter });
  return adapter;
}

/** Close every cached connection (shutdown). */
export async function closeAdapters(): Promise<void> {
  const entries = [...cache.values()];
  cache.clear();
  await Promise.all(entries.map((e) => e.adapter.close().catch(() => {})));
}

/** Round trips per cluster id since the process started. */
export function adapterRoundTrips(): Record<string, number> {
  return Object.fromEntries([...cache.entries()].map(([id, e]) => [id, e.adapter.connection.roundTrips]));
}

/**
 * Mark the cluster unhealthy with a note saying what was seen, and alert coordinators and admins
 * (lib/mail/cluster-fault.ts: at most once per cluster per hour). A mismatch already on record
 * for the same offending key is not recorded again.
 */
export async function reportHostKeyMismatch(clusterId: string, err: HostKeyMismatchError): Promise<void> {
  const { sequelize, Cluster } = db();
  await sequelize.transaction(async (transaction) => {
    const cluster = await Cluster.findByPk(clusterId, { transaction, lock: transaction.LOCK.UPDATE });
    if (!cluster) return;
    const seen = `host key mismatch: the server presented ${err.actual},`;
    if (!cluster.healthy && cluster.healthNote?.startsWith(seen)) return;
    await cluster.update({ healthy: false, healthNote: `${seen} ${err.expected} is pinned; connection refused (${new Date().toISOString()})` }, { transaction });
    const mail = await alertClusterFault(cluster.id, "host_key_mismatch", `pinned ${err.expected}, the server presented ${err.actual}`, { transaction });
    if (!mail) log.error({ cluster: cluster.name }, "host key mismatch and nobody to tell (no active admin or coordinator)");
    log.error({ cluster: cluster.name, expected: err.expected, actual: err.actual }, "host key mismatch: cluster marked unhealthy, staff alerted");
  });
}

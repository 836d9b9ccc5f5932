// One broker cycle (the poll-clusters job): for every active cluster, in parallel and each
// under its own lock, poll its runs, then dispatch queued ones into the free slots. Because
// dispatch runs in every cycle, a queued run whose dispatch-runs job was lost is still sent.
// A run stuck in collecting (its collect job lost with a killed broker) is queued for
// collection again, and about once a minute the mail sweeps requeue stranded e-mail and
// unreported failures.
import type { Logger } from "pino";
import { QueryTypes } from "sequelize";
import { db, type Cluster } from "@/models";
import { adapterFor } from "@/lib/clusters/adapter-for";
import { enqueue } from "@/lib/queue/enqueue";
import { ClusterError, HostKeyMismatchError } from "@/broker/adapters/errors";
import { requeueStrandedMail, requeueUnreportedFailures } from "@/lib/mail/sweep";
import { withLock } from "./locks";
import { pollCluster, type PollOutcome } from "./poll";
import { dispatchCluster, type DispatchOutcome } from "./dispatch";
import { UNREACHABLE_NOTE, markContact, markFaulty, markUnreachable } from "./cluster-health";
import { activeClusters } from "./cluster-runs";

/** Faults of the cluster's configuration that a person must fix: marked, alerted, probed rarely. */
const CONFIG_FAULTS = new Set(["auth_failed", "bad_private_key"]);
/** A cluster unhealthy for any reason but an outage is probed at most this often. */
const MISMATCH_PROBE_MS = 30_000;
const lastProbe = new Map<string, number>();
/** The mail safety nets (lib/mail/sweep.ts) run about once a minute. */
const MAIL_SWEEP_MS = 60_000;
let lastMailSweep = 0;

/** What a cycle did, per cluster name. */
export type CycleOutcome = Record<string, { poll?: PollOutcome; dispatch?: DispatchOutcome; error?: string; skipped?: string }>;

/** Poll and dispatch on one cluster (under its lock). */
export async function serveCluster(cluster: Cluster, log: Logger): Promise<CycleOutcome[string]> {
  const clog = log.child({ cluster: cluster.name });
  const locked = await withLock(`cluster:${cluster.id}`, async () => {
    await cluster.reload();
    if (!cluster.active) return { skipped: "inactive" };
    try {
      if (!cluster.healthy) {
        // An outage may end any moment; a wrong key or host key needs a person, so probe rarely.
        if (!cluster.healthNote?.startsWith(UNREACHABLE_NOTE)) {
          if (Date.now() - (lastProbe.get(cluster.id) ?? 0) < MISMATCH_PROBE_MS) return { skipped: cluster.healthNote ?? "unhealthy" };
          lastProbe.set(cluster.id, Date.now());
        }
      }
      const adapter = adapterFor(cluster);
      if (!cluster.healthy) {
        await adapter.health();
        await markContact(cluster);
        clog.info("cluster answers again: healthy");
      }
      const poll = await pollCluster(cluster, adapter, clog);
      const dispatch = await dispatchCluster(cluster, adapter, clog);
      if (poll.watched > 0 || dispatch.submitted + dispatch.reconciled > 0) await markContact(cluster);
      return { poll, dispatch };
    } catch (err) {
      if (err instanceof HostKeyMismatchError) {
        lastProbe.set(cluster.id, Date.now()); // the adapter marked and alerted; next look in 30 s
        return { error: err.message };
      }
      if (err instanceof ClusterError && err.transient) {
        await markUnreachable(cluster, err);
        clog.warn({ err: err.message }, "cluster unreachable");
        return { error: err.message };
      }
      if (err instanceof ClusterError && CONFIG_FAULTS.has(err.code)) {
        await markFaulty(cluster, err.code, err.message);
        lastProbe.set(cluster.id, Date.now());
        clog.error({ err: err.message }, "cluster refused our key or our key is unusable");
        return { error: err.message };
      }
      throw err;
    }
  });
  return locked.ran ? locked.value : { skipped: "locked" };
}

/**
 * How many clusters one cycle serves at once. Each one holds its lock's transaction (a pooled
 * connection) while its work needs another, so with every active cluster in parallel a group with
 * more clusters than half the pool (10) would hold every connection in lock transactions and wait
 * forever for one more: three lanes leave the pool room for collect, verify and mail jobs.
 */
const CLUSTER_LANES = 3;

/**
 * fn over items, at most `lanes` at a time, results in input order. Ten lines by hand rather than
 * a dependency (p-limit) for one call site.
 */
async function mapInLanes<T, R>(items: T[], lanes: number, fn: (item: T) => Promise<R>): Promise<R[]> {
  const results = new Array<R>(items.length);
  let next = 0;
  const lane = async () => {
    while (next < items.length) {
      const i = next++;
      results[i] = await fn(items[i]);
    }
  };
  await Promise.all(Array.from({ length: Math.min(lanes, items.length) }, lane));
  return results;
}

/** Run one cycle over every active cluster. */
export async function runCycle(log: Logger): Promise<CycleOutcome> {
  const clusters = await activeClusters();
  const results = await mapInLanes(clusters, CLUSTER_LANES, async (c) => {
    try {
      return [c.name, await serveCluster(c, log)] as const;
    } catch (err) {
      log.error({ err, cluster: c.name }, "cluster cycle failed");
      return [c.name, { error: (err as Error).message }] as const;
    }
  });
  await requeueStaleCollections(120);
  if (Date.now() - lastMailSweep > MAIL_SWEEP_MS) {
    lastMailSweep = Date.now();
    await requeueStrandedMail();
    await requeueUnreportedFailures();
  }
  return Object.fromEntries(results);
}

/** Queue collect-run again for runs collecting longer than `seconds` (0 = all of them, at start-up). */
export async function requeueStaleCollections(seconds: number): Promise<number> {
  const rows = await db().sequelize.query<{ id: string }>(
    // Touching updated_at spaces the requeues of one run `seconds` apart.
    `UPDATE runs SET updated_at = now() WHERE state = 'collecting' AND updated_at <= now() - make_interval(secs => $1) RETURNING id`,
    { bind: [seconds], type: QueryTypes.SELECT });
  for (const r of rows) await enqueue("collect-run", { runId: r.id });
  return rows.length;
}

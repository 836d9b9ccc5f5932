import "server-only";
// Two one-off probes for the Clusters page: read the host key a login node presents (shown for a
// coordinator to compare with the one obtained out of band; never stored by this call), and test
// a cluster's settings end to end with its own adapter (pinned key, our key, the scheduler's health).
import ssh2 from "ssh2";
import { fingerprintOfBlob } from "@/broker/adapters/host-key-fingerprint";
import { ClusterError } from "@/broker/adapters/errors";
import { recordAudit, type AuditSource } from "../audit/record-audit";
import { AppError } from "../errors";
import { db } from "@/models";
import { buildAdapter } from "./adapter-for";

/** What a login node presented: its host key's fingerprint and type. */
export type PresentedHostKey = { host: string; port: number; fingerprint: string; keyType: string };

/**
 * Connect once to host:port, read the host key during the key exchange and hang up before
 * authenticating (the verifier refuses, so no credentials are ever sent).
 */
export function fetchHostKey(host: string, port: number, timeoutMs = 10_000): Promise<PresentedHostKey> {
  return new Promise((resolve, reject) => {
    const client = new ssh2.Client();
    let seen: PresentedHostKey | null = null;
    const done = (err: Error | null) => {
      client.end();
      if (seen) resolve(seen);
      else reject(new AppError("bad_request", `no host key from ${host}:${port}: ${err?.message ?? "connection closed"}`));
    };
    client.on("error", (err) => done(err));
    client.on("close", () => done(null));
    client.connect({
      host, port, username: "ergodex-host-key-probe", readyTimeout: timeoutMs,
      hostVerifier: (key: Buffer) => {
        const parsed = ssh2.utils.parseKey(key);
        const keyType = parsed instanceof Error ? "unknown" : (Array.isArray(parsed) ? parsed[0] : parsed).type;
        seen = { host, port, fingerprint: fingerprintOfBlob(key), keyType };
        return false;
      },
    });
  });
}

/** Result of a connection test: reached or not, and what was seen. */
export type ClusterCheck = { ok: boolean; detail: string; slots?: number; running?: number; queued?: number; code?: string };

/**
 * Test a cluster with a fresh adapter: pinned host key, our key, then the scheduler's or node's
 * health. A success records the contact time; a host-key mismatch is reported (and alerted) as
 * the broker would. The attempt is audited.
 */
export async function checkCluster(audit: AuditSource, id: string): Promise<ClusterCheck> {
  const cluster = await db().Cluster.findByPk(id);
  if (!cluster) throw new AppError("not_found", "cluster not found");
  let result: ClusterCheck;
  let adapter: ReturnType<typeof buildAdapter> | null = null;
  try {
    adapter = buildAdapter(cluster); // throws when the stored key cannot be opened
    const h = await adapter.health();
    result = { ok: h.ok, detail: `${h.node}: ${h.slots} slots, ${h.running} running, ${h.queued} queued (${h.protocol})`, slots: h.slots, running: h.running, queued: h.queued };
    if (h.ok) await cluster.update({ lastContactAt: new Date(), ...(cluster.healthy ? {} : { healthy: true, healthNote: null }) });
  } catch (err) {
    const code = err instanceof ClusterError ? err.code : undefined;
    result = { ok: false, detail: (err as Error).message, ...(code ? { code: String(code) } : {}) };
  } finally {
    await adapter?.close().catch(() => {});
  }
  await recordAudit(audit, "cluster.check", { type: "cluster", id }, { ok: result.ok, detail: result.detail });
  return result;
}

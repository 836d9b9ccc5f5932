import "server-only";
// Faults of a cluster itself (its host key changed, it cannot be reached) are not the run owner's
// to fix: they go to the coordinators and admins, at most once per cluster per clock hour, so a
// broker retrying a dead cluster every few seconds does not flood anyone.
import type { Transaction } from "sequelize";
import { env } from "@/lib/env";
import { AppError } from "@/lib/errors";
import { modelsFor } from "@/lib/db/models-for";
import { enqueueMail, type EnqueuedMail } from "./enqueue-mail";
import { emailsOfRoles } from "./recipients";

/** The faults the broker reports; any other short code is accepted too and shown as given. */
export type ClusterFaultReason = "host_key_mismatch" | "unreachable" | (string & {});

const WORDS: Record<string, string> = {
  host_key_mismatch: "presented a host key that does not match the pinned fingerprint; the broker refused to connect",
  unreachable: "cannot be reached; the broker will keep retrying with backoff",
};

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

/** "2025-12-01T14": the clock hour (UTC) a fault falls in, the unit of deduplication. */
export const hourBucket = (at: Date) => at.toISOString().slice(0, 13);

/**
 * Write an alert about cluster `clusterId` to every active coordinator and admin. Returns the
 * outbox message (created: false when this cluster already alerted this hour), or null when
 * nobody holds those roles.
 */
export async function alertClusterFault(
  clusterId: string,
  reason: ClusterFaultReason,
  detail: string,
  options: { transaction?: Transaction; at?: Date } = {},
): Promise<EnqueuedMail | null> {
  if (typeof reason !== "string" || !/^[a-z][a-z0-9_]{0,63}$/.test(reason)) {
    throw new AppError("bad_request", `cluster fault reason ${JSON.stringify(reason)} must be a short snake_case code`);
  }
  if (typeof clusterId !== "string" || !UUID.test(clusterId)) throw new AppError("bad_request", `cluster id ${JSON.stringify(clusterId)} is not a uuid`);
  const { Cluster } = modelsFor(options.transaction);
  const cluster = await Cluster.findByPk(clusterId, { transaction: options.transaction });
  if (!cluster) throw new AppError("not_found", `cluster ${clusterId} does not exist`);
  const to = await emailsOfRoles(["coordinator", "admin"], { transaction: options.transaction });
  if (to.length === 0) return null;
  const at = options.at ?? new Date();
  const text = [
    `Cluster "${cluster.name}" (${cluster.username}@${cluster.host}:${cluster.port}) ${WORDS[reason] ?? `reported a fault: ${reason}`}.`,
    "",
    `Reason: ${reason}`,
    `Detail: ${String(detail ?? "").slice(0, 2_000) || "(none)"}`,
    `When: ${at.toISOString()}`,
    "",
    "Runs waiting for this cluster stay queued until it is healthy again.",
    reason === "host_key_mismatch"
      ? "If the key change is expected, update the cluster's pinned fingerprint on the Clusters page; otherwise treat it as a possible interception."
      : "Check the login node and the network path to it.",
    `Clusters: ${env.appUrl}/clusters`,
    "",
    "You receive this as a coordinator or admin of Ergodex. Further faults of this cluster within the same hour are not mailed again.",
  ].join("\n");
  return enqueueMail(
    { to, subject: `[Ergodex] Cluster "${cluster.name}": ${reason.replace(/_/g, " ")}`, textBody: text, kind: "cluster.fault",
      dedupeKey: `cluster-fault:${clusterId}:${hourBucket(at)}` },
    { transaction: options.transaction },
  );
}

import "server-only";
// Create and change clusters (coordinators and admins). The private key is sealed at once and
// never leaves this module again: every view of a cluster is toClusterView, which has no key.
import { UniqueConstraintError } from "sequelize";
import { sealSecret } from "../crypto/secret-box";
import { AppError } from "../errors";
import { recordAudit, type AuditSource } from "../audit/record-audit";
import { db, type Cluster } from "@/models";
import { checkFingerprint, checkPrivateKey, mergeSettings, type ClusterChange, type ClusterInput } from "./cluster-input";

/** A cluster as the admin UI and API show it: everything but the key. */
export type ClusterView = ReturnType<typeof toClusterView>;

/** The safe view of a cluster row. */
export function toClusterView(c: Cluster) {
  return {
    id: c.id, name: c.name, kind: c.kind, host: c.host, port: c.port, username: c.username,
    hostKeyFingerprint: c.hostKeyFingerprint, workDir: c.workDir, slotLimit: c.slotLimit, active: c.active,
    healthy: c.healthy, healthNote: c.healthNote, lastContactAt: c.lastContactAt?.toISOString() ?? null,
    settings: c.settings ?? {}, hasPrivateKey: Boolean(c.privateKeyEncrypted), updatedAt: c.updatedAt.toISOString(),
  };
}

/** Every cluster, safe view, by name. */
export async function listClusters(): Promise<ClusterView[]> {
  return (await db().Cluster.findAll({ order: [["name", "ASC"]] })).map(toClusterView);
}

const nameTaken = (err: unknown, name: string | undefined) => {
  if (err instanceof UniqueConstraintError) return new AppError("conflict", `a cluster named "${name}" exists already`, { issues: [{ path: "/name", message: "taken" }] });
  return err;
};

/** Create a cluster; the key is checked, sealed and audited as "set" (never its text). */
export async function createCluster(audit: AuditSource, input: ClusterInput): Promise<ClusterView> {
  const fingerprint = checkFingerprint(input.hostKeyFingerprint);
  const key = checkPrivateKey(input.privateKey);
  const { sequelize, Cluster } = db();
  try {
    return await sequelize.transaction(async (transaction) => {
      if (await Cluster.findOne({ where: { name: input.name }, transaction })) throw nameTaken(new UniqueConstraintError({}), input.name);
      const row = await Cluster.create({
        name: input.name, kind: input.kind, host: input.host, port: input.port ?? 22, username: input.username,
        hostKeyFingerprint: fingerprint, privateKeyEncrypted: sealSecret(key), workDir: input.workDir, slotLimit: input.slotLimit,
        active: input.active ?? true, settings: mergeSettings({}, input.settings),
      }, { transaction });
      const { privateKey: _key, ...shown } = input;
      await recordAudit(audit, "cluster.create", { type: "cluster", id: row.id }, { ...shown, hostKeyFingerprint: fingerprint, privateKey: "set" }, transaction);
      return toClusterView(row);
    });
  } catch (err) {
    throw nameTaken(err, input.name);
  }
}

/**
 * Change a cluster. A new fingerprint or key marks it healthy again for the broker to retry
 * (a person has acted on the alert); the audit entry lists the fields changed, with old and new
 * values except for the key.
 */
export async function updateCluster(audit: AuditSource, id: string, change: ClusterChange): Promise<ClusterView> {
  const { sequelize, Cluster } = db();
  try {
    return await sequelize.transaction(async (transaction) => {
      const row = await Cluster.findByPk(id, { transaction, lock: transaction.LOCK.UPDATE });
      if (!row) throw new AppError("not_found", "cluster not found");
      const before = toClusterView(row);
      const patch: Partial<Cluster> = {};
      for (const k of ["name", "kind", "host", "port", "username", "workDir", "slotLimit", "active"] as const) {
        if (change[k] !== undefined) (patch as Record<string, unknown>)[k] = change[k];
      }
      if (change.hostKeyFingerprint !== undefined) patch.hostKeyFingerprint = checkFingerprint(change.hostKeyFingerprint);
      if (change.privateKey !== undefined) patch.privateKeyEncrypted = sealSecret(checkPrivateKey(change.privateKey));
      if (change.settings !== undefined) patch.settings = mergeSettings(row.settings ?? {}, change.settings);
      if (patch.hostKeyFingerprint !== undefined || patch.privateKeyEncrypted !== undefined) Object.assign(patch, { healthy: true, healthNote: null });
      await row.update(patch, { transaction });
      const after = toClusterView(row);
      const changed: Record<string, { from: unknown; to: unknown }> = {};
      for (const k of Object.keys(patch) as (keyof typeof before)[]) {
        if (k in before && JSON.stringify(before[k]) !== JSON.stringify(after[k])) changed[k] = { from: before[k], to: after[k] };
      }
      if (change.privateKey !== undefined) changed.privateKey = { from: "set", to: "replaced" };
      const action = change.active === false && before.active ? "cluster.deactivate" : "cluster.update";
      await recordAudit(audit, action, { type: "cluster", id }, { changed }, transaction);
      return after;
    });
  } catch (err) {
    throw nameTaken(err, change.name);
  }
}

// A cluster's health as the broker sees it: contact clears an unhealthy mark; an outage marks
// it unhealthy and tells coordinators and admins.
import { db, type Cluster } from "@/models";
import { alertClusterFault } from "@/lib/mail/cluster-fault";

export const HOST_KEY_NOTE = "host key mismatch";
export const UNREACHABLE_NOTE = "unreachable";

/** The cluster answered: record the contact, and clear an earlier unhealthy mark. */
export async function markContact(cluster: Cluster): Promise<void> {
  await cluster.update({ lastContactAt: new Date(), ...(cluster.healthy ? {} : { healthy: true, healthNote: null }) });
}

/** The cluster could not be reached: mark it unhealthy and alert the staff (at most hourly per cluster). */
export async function markUnreachable(cluster: Cluster, err: Error): Promise<void> {
  const { sequelize, Cluster: ClusterModel } = db();
  await sequelize.transaction(async (transaction) => {
    const c = await ClusterModel.findByPk(cluster.id, { transaction, lock: transaction.LOCK.UPDATE });
    if (!c || !c.healthy) return; // already marked (this outage, or a host-key mismatch that outranks it)
    await c.update({ healthy: false, healthNote: `${UNREACHABLE_NOTE} since ${new Date().toISOString()}: ${err.message}` }, { transaction });
    await alertClusterFault(c.id, "unreachable", err.message, { transaction });
  });
  cluster.healthy = false;
}

/** A fault of the cluster's configuration (our key refused or unreadable): mark it and alert the staff. */
export async function markFaulty(cluster: Cluster, code: string, message: string): Promise<void> {
  const { sequelize, Cluster: ClusterModel } = db();
  await sequelize.transaction(async (transaction) => {
    const c = await ClusterModel.findByPk(cluster.id, { transaction, lock: transaction.LOCK.UPDATE });
    if (!c || (!c.healthy && c.healthNote?.startsWith(`${code}:`))) return;
    await c.update({ healthy: false, healthNote: `${code}: ${message} (${new Date().toISOString()})` }, { transaction });
    await alertClusterFault(c.id, code, message, { transaction });
  });
  cluster.healthy = false;
}

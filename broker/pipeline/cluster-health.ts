// A cluster's health as the broker sees it: contact clears an unreachable mark; an outage
// marks it unhealthy and tells coordinators and admins once per outage.
import { db, type Cluster } from "@/models";
import { env } from "@/lib/env";
import { enqueueMail } from "@/lib/mail/enqueue-mail";

export const HOST_KEY_NOTE = "host key mismatch";
export const UNREACHABLE_NOTE = "unreachable";

/** The cluster answered: record the contact, and clear an earlier unhealthy mark. */
export async function markContact(cluster: Cluster): Promise<void> {
  await cluster.update({ lastContactAt: new Date(), ...(cluster.healthy ? {} : { healthy: true, healthNote: null }) });
}

/** The cluster could not be reached: mark it unhealthy and, on the first failure of an outage, e-mail the staff. */
export async function markUnreachable(cluster: Cluster, err: Error): Promise<void> {
  const { sequelize, Cluster: ClusterModel, User } = db();
  await sequelize.transaction(async (transaction) => {
    const c = await ClusterModel.findByPk(cluster.id, { transaction, lock: transaction.LOCK.UPDATE });
    if (!c || !c.healthy) return; // already marked (this outage, or a host-key mismatch that outranks it)
    const since = new Date().toISOString();
    await c.update({ healthy: false, healthNote: `${UNREACHABLE_NOTE} since ${since}: ${err.message}` }, { transaction });
    const staff = await User.findAll({ where: { role: ["admin", "coordinator"], active: true }, attributes: ["email"], transaction });
    if (staff.length === 0) return;
    await enqueueMail({
      to: staff.map((u) => u.email),
      subject: `[Ergodex] Cluster ${c.name} is unreachable`,
      textBody: [
        `The broker cannot reach cluster "${c.name}" (${c.host}:${c.port}) since ${since}:`,
        `  ${err.message}`,
        ``,
        `Nothing new is dispatched there until it answers again; runs already on it are watched`,
        `again as soon as it does. ${env.appUrl}/clusters`,
      ].join("\n"),
      kind: "cluster.unreachable",
      dedupeKey: `cluster.unreachable:${c.id}:${since}`,
    }, { transaction });
  });
  cluster.healthy = false;
}

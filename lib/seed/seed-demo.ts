// Seeds the demo scenario idempotently: every row is found by its natural key first,
// so a second run changes nothing. One transaction: a failed seed leaves nothing half-written.
import { db } from "@/models";
import { hashPassword } from "../auth/passwords";
import { sealSecret } from "../crypto/secret-box";
import { SAMPLER_CATALOG } from "../samplers/schemas";
import { DEMO_ALLOCATION, DEMO_CLUSTER, DEMO_GROUP, DEMO_PEOPLE } from "./demo-scenario";
import { seedAllocationHistory } from "./demo-allocation-history";

/** What the fake cluster needs from the seed and gives back (its host key, the app's key pair). */
export type FakeClusterLink = {
  host: string;
  port: number;
  username: string;
  hostKeyFingerprint: string;
  /** Returns the app's private key, creating the pair (and authorising its public half) on first use. */
  clientPrivateKey: () => string;
  workDir: string;
  samplerCommand: string;
  /** As many runs as the loopback node executes at once. */
  slotLimit: number;
};

export async function seedDemo(link: FakeClusterLink): Promise<{ created: string[] }> {
  const m = db();
  const created: string[] = [];
  await m.sequelize.transaction(async (transaction) => {
    const [group, gNew] = await m.Group.findOrCreate({ where: { slug: DEMO_GROUP.slug }, defaults: DEMO_GROUP, transaction });
    if (gNew) created.push(`group ${group.slug}`);
    for (const p of DEMO_PEOPLE) {
      let user = await m.User.findOne({ where: { email: p.email }, transaction });
      if (!user) {
        user = await m.User.create({ email: p.email, name: p.name, role: p.role, passwordHash: await hashPassword(p.password) }, { transaction });
        created.push(`person ${p.email}`);
      } // an existing person is left as they are: the seed never undoes a change someone made

      if (p.member) {
        const [, mNew] = await m.Membership.findOrCreate({ where: { userId: user.id, groupId: group.id }, defaults: { userId: user.id, groupId: group.id, isLead: Boolean(p.isLead) }, transaction });
        if (mNew) created.push(`membership ${p.email}`);
      }
    }
    const [alloc, aNew] = await m.Allocation.findOrCreate({
      where: { groupId: group.id, name: DEMO_ALLOCATION.name },
      defaults: { groupId: group.id, name: DEMO_ALLOCATION.name, periodStart: DEMO_ALLOCATION.periodStart, periodEnd: DEMO_ALLOCATION.periodEnd, perPersonCapCoreHours: DEMO_ALLOCATION.perPersonCapCoreHours },
      transaction,
    });
    if (aNew) {
      const coordinator = await m.User.findOne({ where: { email: DEMO_PEOPLE.find((p) => p.role === "coordinator")!.email }, transaction });
      await m.LedgerEntry.create({ allocationId: alloc.id, kind: "grant", coreHours: DEMO_ALLOCATION.grantCoreHours, userId: coordinator?.id ?? null, note: "demo grant for the 2026–27 period" }, { transaction });
      created.push(`allocation ${alloc.name} with a grant of ${DEMO_ALLOCATION.grantCoreHours} core-hours`);
    }
    const idOf = async (role: string) => (await m.User.findOne({ where: { email: DEMO_PEOPLE.find((p) => p.role === role)!.email }, transaction }))?.id ?? null;
    created.push(...await seedAllocationHistory(m, group.id, { coordinatorId: await idOf("coordinator"), piId: await idOf("pi"), researcherId: await idOf("researcher") }, transaction));
    const existing = await m.Cluster.findOne({ where: { name: DEMO_CLUSTER.name }, transaction });
    if (!existing) {
      await m.Cluster.create({
        name: DEMO_CLUSTER.name, kind: "fake-ssh", host: link.host, port: link.port, username: link.username,
        hostKeyFingerprint: link.hostKeyFingerprint, privateKeyEncrypted: sealSecret(link.clientPrivateKey()),
        workDir: link.workDir, slotLimit: link.slotLimit, healthy: true, settings: { samplerCommand: link.samplerCommand, pollSeconds: 2 },
      }, { transaction });
      created.push(`cluster ${DEMO_CLUSTER.name}`);
    } else if (existing.port !== link.port || existing.hostKeyFingerprint !== link.hostKeyFingerprint) {
      // The loopback cluster's port or host key changed (new data dir or port): follow it.
      await existing.update({ port: link.port, hostKeyFingerprint: link.hostKeyFingerprint }, { transaction });
      created.push(`cluster ${DEMO_CLUSTER.name} re-pinned`);
    }
    for (const s of Object.values(SAMPLER_CATALOG)) {
      const [, sNew] = await m.Sampler.findOrCreate({
        where: { name: s.name, version: s.version },
        defaults: { name: s.name, version: s.version, command: `npm run sampler -- ${s.name}`, paramsSchema: s.paramsSchema as Record<string, unknown>, observables: [...s.observables], description: s.description },
        transaction,
      });
      if (sNew) created.push(`sampler ${s.name} ${s.version}`);
    }
  });
  return { created };
}

// Shared setup of the ensemble tests: the built-in sampler rows, a cluster, people and spec builders.
import { QueryTypes } from "sequelize";
import { db, type Group, type User } from "@/models";
import { loadIdentity, type Identity } from "@/lib/auth/identity";
import { SAMPLER_CATALOG } from "@/lib/samplers/schemas";
import { parseSpec, type EnsembleSpec } from "@/lib/spec";
import { makeCluster, makeUser } from "../../support/db";

/** Register the built-in samplers (the template database is migrated, not seeded) and one active cluster. */
export async function registerSamplersAndCluster() {
  for (const s of Object.values(SAMPLER_CATALOG)) {
    await db().Sampler.findOrCreate({
      where: { name: s.name, version: s.version },
      defaults: { name: s.name, version: s.version, command: `npm run sampler -- ${s.name}`, paramsSchema: s.paramsSchema as Record<string, unknown>, observables: [...s.observables] },
    });
  }
  if ((await db().Cluster.count({ where: { active: true } })) === 0) await makeCluster();
}

/** A person and their Identity as the guard would load it. */
export async function person(role: Parameters<typeof makeUser>[0], group: Group | null, overrides: Parameters<typeof makeUser>[2] = {}): Promise<{ user: User; who: Identity }> {
  const user = await makeUser(role, group, overrides);
  return { user, who: (await loadIdentity(user.id, "session"))! };
}

export const audit = (who: Identity) => ({ actorId: who.userId, ip: "127.0.0.1", requestId: `test-${Math.random().toString(36).slice(2)}` });

/** A small ising2d spec: `temps` points × `replicas`, cores × wallMinutes per run. */
export function isingSpec(over: Partial<Record<keyof EnsembleSpec, unknown>> & { temps?: number[] } = {}): EnsembleSpec {
  const { temps = [2.2, 2.3, 2.4], ...rest } = over;
  return parseSpec({
    format: "ergodex.ensemble/1", name: "Ising L=8 near Tc", sampler: { name: "ising2d", version: "1.0.0" },
    fixed: { L: 8, algorithm: "metropolis" }, scan: [{ param: "T", values: temps }], replicas: 2,
    thermalization: 50, measurements: 200, seed: "987654321", resources: { cores: 2, wallMinutes: 30 }, tags: ["near-tc", "L8"],
    ...rest,
  });
}

/** Jobs of one queue in the pg-boss schema, oldest first. */
export async function jobs(name: string): Promise<{ data: Record<string, unknown>; state: string }[]> {
  return db().sequelize.query("SELECT data, state FROM pgboss.job WHERE name = $1 ORDER BY created_on, id", { type: QueryTypes.SELECT, bind: [name] });
}

/** Row counts of the tables a submission writes. */
export async function counts() {
  const m = db();
  const jobCount = await m.sequelize.query<{ n: string }>("SELECT count(*) AS n FROM pgboss.job WHERE name = 'dispatch-runs'", { type: QueryTypes.SELECT })
    .catch(() => [{ n: "0" }]); // before the first enqueue the pgboss schema may not exist yet
  return {
    ensembles: await m.Ensemble.count(), points: await m.ParameterPoint.count(), runs: await m.Run.count(), events: await m.RunEvent.count(),
    ledger: await m.LedgerEntry.count(), audits: await m.AuditEntry.count(), jobs: Number(jobCount[0].n),
  };
}

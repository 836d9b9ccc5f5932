// A small archive with known contents for the explorer tests: two groups, three ensembles, point and
// run estimates whose means are a known function of the parameters (invented values, not physics).
import { db, type Estimate, type User } from "@/models";
import { loadIdentity, type Identity } from "@/lib/auth/identity";
import { makeEnsemble, makeGroup, makeSampler, makeUser } from "@/tests/support/db";

export type Seeded = {
  estimates: Estimate[]; people: Record<"owner" | "viewerA" | "viewerB" | "loner" | "coordinator", Identity>;
  ensembles: Record<"scan" | "big" | "other", { id: string; name: string }>; ownerUser: User;
};

/** mean of a point estimate: e = −T·L/10, absM = T/L (so sorts and ranges have one right answer). */
export const meanOf = (observable: string, p: Record<string, unknown>) =>
  typeof p.T === "number" ? (observable === "e" ? (-p.T * Number(p.L)) / 10 : p.T / Number(p.L)) : 7;

/** Seed the archive. Ensemble "scan" has one point whose T is the string "hot" (the cast guard must skip it). */
export async function seedArchive(): Promise<Seeded> {
  const groupA = await makeGroup();
  const groupB = await makeGroup();
  const owner = await makeUser("researcher", groupA);
  const owner2 = await makeUser("researcher", groupB);
  const sampler = await makeSampler({
    paramsSchema: { type: "object", properties: { L: { type: "integer" }, T: { type: "number" }, algorithm: { type: "string" } } },
  });
  const scan = await makeEnsemble({ owner, group: groupA, sampler, cluster: null, replicas: 2, tags: ["scan", "prod"],
    points: [2.0, 2.2, 2.4, 2.6].map((T) => ({ L: 8, T, algorithm: "metropolis" })).concat([{ L: 8, T: "hot" as unknown as number, algorithm: "metropolis" }]) });
  const big = await makeEnsemble({ owner, group: groupA, sampler, cluster: null, replicas: 2, tags: ["prod"],
    points: [2.1, 2.3, 2.5].map((T) => ({ L: 16, T, algorithm: "wolff" })) });
  const other = await makeEnsemble({ owner: owner2, group: groupB, sampler, cluster: null, replicas: 1, tags: ["scan"],
    points: [2.2, 2.4].map((T) => ({ L: 8, T, algorithm: "metropolis" })) });
  const rows = [];
  for (const fx of [scan, big, other]) {
    for (const p of fx.points) {
      for (const observable of ["e", "absM"]) {
        const mean = meanOf(observable, p.params);
        const common = { pointId: p.id, ensembleId: fx.ensemble.id, observable, n: 1000, method: "gamma-wolff", analysisVersion: "test-1", params: p.params };
        rows.push({ ...common, scope: "point" as const, runId: null, mean, error: 0.01, tauInt: 1.5 + p.pointIndex });
        for (const r of fx.runs.filter((r) => r.pointId === p.id)) {
          rows.push({ ...common, scope: "run" as const, runId: r.id, mean: mean + 0.001 * (r.replica + 1), error: 0.014, tauInt: 2 + r.replica });
        }
      }
    }
  }
  const estimates = await db().Estimate.bulkCreate(rows, { returning: true });
  const viewerA = await makeUser("viewer", groupA);
  const viewerB = await makeUser("viewer", groupB);
  const loner = await makeUser("viewer");
  const coordinator = await makeUser("coordinator");
  const id = async (u: User) => (await loadIdentity(u.id, "session"))!;
  return {
    estimates, ownerUser: owner,
    people: { owner: await id(owner), viewerA: await id(viewerA), viewerB: await id(viewerB), loner: await id(loner), coordinator: await id(coordinator) },
    ensembles: {
      scan: { id: scan.ensemble.id, name: scan.ensemble.name }, big: { id: big.ensemble.id, name: big.ensemble.name }, other: { id: other.ensemble.id, name: other.ensemble.name },
    },
  };
}

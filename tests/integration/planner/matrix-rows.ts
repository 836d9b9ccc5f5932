// Authorization-matrix rows for the planner routes (spread into tests/integration/auth/matrix.test.ts).
// The prediction names a fresh group-A pilot ensemble with one finished run and its estimate: members and
// cross-group roles get a prediction (201), outsiders are told the pilot does not exist (404).
import type { Role } from "@/lib/auth/roles";
import { writeEstimateVersions } from "@/lib/estimates/write-estimates";
import { db } from "@/models";
import { makeEnsemble } from "@/tests/support/db";
import type { makeMatrixPeople, Person } from "@/tests/integration/auth/people-fixture";

type Fx = Awaited<ReturnType<typeof makeMatrixPeople>>;
type Expect = Partial<Record<Role | "anonymous", number | { member: number; outsider: number }>>;
type Row = { file: string; method: string; path: (fx: Fx, p: Person | null) => string | Promise<string>; body?: (fx: Fx, p: Person | null) => unknown; expect: Expect };

/** A group-A pilot: one ising2d run, finished, with a current estimate of e. */
async function matrixPilot(fx: Fx): Promise<string> {
  const owner = (await db().User.findByPk(fx.people.find((p) => p.role === "researcher" && p.where === "member")!.id))!;
  const sampler = (await db().Sampler.findOne({ where: { name: "ising2d", version: "1.0.0" } }))!;
  const { ensemble, runs, points } = await makeEnsemble({ owner, group: fx.groupA, sampler, cluster: null, points: [{ L: 4, T: 3, algorithm: "metropolis" }], replicas: 1 });
  // state set directly: the matrix tests the guard, not the run lifecycle
  await db().Run.update({ state: "done", sweepsTotal: 1000, startedAt: new Date(Date.now() - 2000), finishedAt: new Date() }, { where: { id: runs[0].id } });
  await db().sequelize.transaction((transaction) => writeEstimateVersions("run", runs[0].id, [{
    pointId: points[0].id, ensembleId: ensemble.id, params: points[0].params, observable: "e", mean: -0.8, error: 0.01, tauInt: 1.5, tauIntError: 0.1,
    thermCut: 0, n: 1000, window: 8, method: "gamma-wolff", analysisVersion: "matrix",
  }], transaction));
  return ensemble.id;
}

let lastPilot = "";
const IN_SCOPE: Expect = { anonymous: 401, viewer: 403, researcher: { member: 201, outsider: 404 }, pi: { member: 201, outsider: 404 }, coordinator: 201, admin: 201 };

export const PLANNER_ROUTES: Row[] = [
  // the matrix builds the path (awaited) before the body (not awaited): the path makes the pilot, the body names it
  {
    file: "app/api/v1/planner/route.ts", method: "POST", path: async (fx) => { lastPilot = await matrixPilot(fx); return "/api/v1/planner"; },
    body: () => ({ sampler: "ising2d", observable: "e", targetError: 0.005, replicas: 2, params: { L: 4, T: 3, algorithm: "metropolis" }, pilotEnsembleId: lastPilot }),
    expect: IN_SCOPE,
  },
  { file: "app/api/v1/planner/record/route.ts", method: "GET", path: () => "/api/v1/planner/record", expect: { anonymous: 401, viewer: 200, researcher: 200, pi: 200, coordinator: 200, admin: 200 } },
];

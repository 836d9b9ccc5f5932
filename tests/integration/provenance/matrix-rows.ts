// Authorization-matrix rows for the manuscripts, provenance and audit routes and actions (spread into
// tests/integration/auth/matrix.test.ts). Each call gets a fresh manuscript of group A created by its leading PI:
// "draft" (no exhibits), "ready" (one exhibit over a run estimate, so it can be frozen) or "frozen".
import crypto from "node:crypto";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import type { ActionDef } from "@/lib/auth/action";
import type { Role } from "@/lib/auth/roles";
import * as manuscriptActions from "@/lib/actions/manuscripts";
import { writeEstimateVersions } from "@/lib/estimates/write-estimates";
import { addExhibit, createManuscript } from "@/lib/manuscripts/edit-manuscript";
import { freezeManuscript } from "@/lib/manuscripts/freeze-manuscript";
import { requestVerification } from "@/lib/manuscripts/verify-manuscript";
import { transitionRun } from "@/lib/runs/transition-run";
import { archiveFile } from "@/lib/storage/archive-file";
import { db } from "@/models";
import { makeEnsemble } from "@/tests/support/db";
import type { makeMatrixPeople, Person } from "@/tests/integration/auth/people-fixture";

type Fx = Awaited<ReturnType<typeof makeMatrixPeople>>;
type Expect = Partial<Record<Role | "anonymous", number | { member: number; outsider: number }>>;
const audit = { actorId: null, ip: null, requestId: "matrix" };
const piOf = (fx: Fx) => fx.people.find((p) => p.role === "pi" && p.where === "member")!;
const researcherOf = (fx: Fx) => fx.people.find((p) => p.role === "researcher" && p.where === "member")!;

/** A fresh ensemble of group A with one run and one run estimate; returns ids. */
export async function matrixEstimate(fx: Fx): Promise<{ ensembleId: string; runId: string; estimateId: string }> {
  const owner = (await db().User.findByPk(researcherOf(fx).id))!;
  const sampler = (await db().Sampler.findOne({ where: { name: "ising2d", version: "1.0.0" } }))!;
  const { ensemble, runs, points } = await makeEnsemble({ owner, group: fx.groupA, sampler, cluster: null, points: [{ L: 4, T: 2 }], replicas: 1 });
  const [est] = await db().sequelize.transaction((transaction) => writeEstimateVersions("run", runs[0].id, [{
    pointId: points[0].id, ensembleId: ensemble.id, params: points[0].params, observable: "e", mean: -1.5, error: 0.01, tauInt: 1.2, tauIntError: 0.1,
    thermCut: 0, n: 100, window: 5, method: "gamma-wolff", analysisVersion: "matrix", chosenById: null, chosenAt: null,
  }], transaction));
  return { ensembleId: ensemble.id, runId: runs[0].id, estimateId: est.id };
}

/** A fresh done run of group A on a (placeholder) cluster, owned by the group's researcher: replayable. */
export async function matrixDoneRun(fx: Fx): Promise<string> {
  const owner = (await db().User.findByPk(researcherOf(fx).id))!;
  const { runs } = await makeEnsemble({ owner, group: fx.groupA, points: [{ L: 4, T: 2 }], replicas: 1 });
  for (const to of ["dispatched", "running", "collecting", "done"] as const) await transitionRun(runs[0].id, to, { cause: "test.matrix" });
  return runs[0].id;
}

/** A fresh done run of group A with one archived file (random bytes, so its own sha256); returns the download path. */
export async function matrixRunFile(fx: Fx): Promise<string> {
  const runId = await matrixDoneRun(fx);
  const tmp = path.join(os.tmpdir(), `ergodex-matrix-${crypto.randomBytes(6).toString("hex")}.csv`);
  fs.writeFileSync(tmp, `lambda\n${crypto.randomInt(1e9)}\n`);
  try {
    const a = await archiveFile(tmp, { name: "spectrum.csv" });
    await db().RunArtifact.create({ runId, path: "spectrum.csv", artifactSha256: a.sha256, role: "extra" });
    return `/api/v1/provenance/runs/${runId}/files/${a.sha256}`;
  } finally {
    fs.rmSync(tmp, { force: true });
  }
}

/** A fresh manuscript of group A in the given state. */
export async function matrixManuscript(fx: Fx, state: "draft" | "ready" | "frozen"): Promise<string> {
  const pi = piOf(fx).who;
  const ms = await createManuscript(audit, pi, { groupId: fx.groupA.id, title: `Matrix ${crypto.randomBytes(3).toString("hex")}` });
  if (state === "draft") return ms.id;
  const { ensembleId } = await matrixEstimate(fx);
  await addExhibit(audit, pi, ms.id, { label: "Fig. 1", kind: "figure", query: { ensembleIds: [ensembleId], observable: "e", scope: "run" } });
  if (state === "frozen") await freezeManuscript(audit, pi, ms.id);
  return ms.id;
}

const READ_A: Expect = { anonymous: 401, viewer: { member: 200, outsider: 404 }, researcher: { member: 200, outsider: 404 }, pi: { member: 200, outsider: 404 }, coordinator: 200, admin: 200 };
const M = "app/api/v1/manuscripts";

/** Route rows (same shape as matrix.test.ts's RouteRow). */
export const MANUSCRIPT_ROUTES: { file: string; method: string; path: (fx: Fx, p: Person | null) => string | Promise<string>; body?: (fx: Fx, p: Person | null) => unknown; expect: Expect }[] = [
  { file: `${M}/route.ts`, method: "GET", path: () => "/api/v1/manuscripts", expect: { anonymous: 401, viewer: 200, researcher: 200, pi: 200, coordinator: 200, admin: 200 } },
  // only a PI leading the group (or an admin) creates; a PI of another group passes the role check and is refused by the lead rule
  { file: `${M}/route.ts`, method: "POST", path: () => "/api/v1/manuscripts", body: (fx) => ({ groupId: fx.groupA.id, title: "Matrix paper" }), expect: { anonymous: 401, viewer: 403, researcher: 403, pi: { member: 201, outsider: 403 }, coordinator: 403, admin: 201 } },
  // a viewer of the group reads a frozen manuscript
  { file: `${M}/[id]/route.ts`, method: "GET", path: async (fx) => `/api/v1/manuscripts/${await matrixManuscript(fx, "frozen")}`, expect: READ_A },
  // the group's researcher is neither creator nor collaborator: 403
  { file: `${M}/[id]/exhibits/route.ts`, method: "POST", path: async (fx) => `/api/v1/manuscripts/${await matrixManuscript(fx, "draft")}/exhibits`, body: () => ({ label: "T1", kind: "table", query: {} }),
    expect: { anonymous: 401, viewer: 403, researcher: { member: 403, outsider: 404 }, pi: { member: 201, outsider: 404 }, coordinator: 403, admin: 201 } },
  { file: `${M}/[id]/freeze/route.ts`, method: "POST", path: async (fx) => `/api/v1/manuscripts/${await matrixManuscript(fx, "ready")}/freeze`,
    expect: { anonymous: 401, viewer: 403, researcher: 403, pi: { member: 200, outsider: 404 }, coordinator: 403, admin: 200 } },
  // only a PI leading the group unfreezes; not an admin, not a viewer
  { file: `${M}/[id]/unfreeze/route.ts`, method: "POST", path: async (fx) => `/api/v1/manuscripts/${await matrixManuscript(fx, "frozen")}/unfreeze`, body: () => ({ reason: "matrix" }),
    expect: { anonymous: 401, viewer: 403, researcher: 403, pi: { member: 200, outsider: 404 }, coordinator: 403, admin: 403 } },
  { file: `${M}/[id]/verify/route.ts`, method: "POST", path: async (fx) => `/api/v1/manuscripts/${await matrixManuscript(fx, "frozen")}/verify`,
    expect: { anonymous: 401, viewer: 403, researcher: { member: 403, outsider: 404 }, pi: { member: 202, outsider: 404 }, coordinator: 403, admin: 202 } },
  { file: `${M}/[id]/verifications/[vid]/route.ts`, method: "GET", path: async (fx) => {
    const id = await matrixManuscript(fx, "frozen");
    return `/api/v1/manuscripts/${id}/verifications/${await requestVerification(audit, piOf(fx).who, id)}`;
  }, expect: READ_A },
  { file: `${M}/[id]/bundle/route.ts`, method: "GET", path: async (fx) => `/api/v1/manuscripts/${await matrixManuscript(fx, "frozen")}/bundle`, expect: READ_A },
  { file: "app/api/v1/provenance/runs/[id]/route.ts", method: "GET", path: async (fx) => `/api/v1/provenance/runs/${(await matrixEstimate(fx)).runId}`, expect: READ_A },
  { file: "app/api/v1/provenance/ensembles/[id]/route.ts", method: "GET", path: async (fx) => `/api/v1/provenance/ensembles/${(await matrixEstimate(fx)).ensembleId}`, expect: READ_A },
  { file: "app/api/v1/provenance/estimates/[id]/route.ts", method: "GET", path: async (fx) => `/api/v1/provenance/estimates/${(await matrixEstimate(fx)).estimateId}?format=listing-csv`, expect: READ_A },
  // the run's owner (the group's researcher), a PI of the group and an admin may replay; a viewer reads the replays
  { file: "app/api/v1/runs/[id]/replay/route.ts", method: "POST", path: async (fx) => `/api/v1/runs/${await matrixDoneRun(fx)}/replay`,
    expect: { anonymous: 401, viewer: 403, researcher: { member: 202, outsider: 404 }, pi: { member: 202, outsider: 404 }, coordinator: 403, admin: 202 } },
  { file: "app/api/v1/runs/[id]/replay/route.ts", method: "GET", path: async (fx) => `/api/v1/runs/${await matrixDoneRun(fx)}/replay`, expect: READ_A },
  { file: "app/api/v1/provenance/runs/[id]/files/[sha256]/route.ts", method: "GET", path: (fx) => matrixRunFile(fx), expect: READ_A },
  { file: "app/api/v1/audit/route.ts", method: "GET", path: () => "/api/v1/audit?pageSize=5", expect: { anonymous: 401, viewer: 403, researcher: 403, pi: 200, coordinator: 403, admin: 200 } },
];

const A = "app/(app)/manuscripts/actions";
/** Action rows (same shape as matrix.test.ts's ActionRow). */
export const MANUSCRIPT_ACTIONS: { file: string; def: ActionDef<any, any>; input: (fx: Fx, p: Person) => unknown | Promise<unknown>; expect: Expect }[] = [
  { file: `${A}/create-manuscript.ts`, def: manuscriptActions.createManuscriptAction, input: (fx) => ({ groupId: fx.groupA.id, title: "Matrix action paper" }),
    expect: { viewer: 403, researcher: 403, pi: { member: 200, outsider: 403 }, coordinator: 403, admin: 200 } },
  { file: `${A}/add-exhibit.ts`, def: manuscriptActions.addExhibitAction, input: async (fx) => ({ id: await matrixManuscript(fx, "draft"), exhibit: { label: "T1", kind: "table", query: {} } }),
    expect: { viewer: 403, researcher: { member: 403, outsider: 404 }, pi: { member: 200, outsider: 404 }, coordinator: 403, admin: 200 } },
  { file: `${A}/freeze-manuscript.ts`, def: manuscriptActions.freezeManuscriptAction, input: async (fx) => ({ id: await matrixManuscript(fx, "ready") }),
    expect: { viewer: 403, researcher: 403, pi: { member: 200, outsider: 404 }, coordinator: 403, admin: 200 } },
  { file: `${A}/unfreeze-manuscript.ts`, def: manuscriptActions.unfreezeManuscriptAction, input: async (fx) => ({ id: await matrixManuscript(fx, "frozen"), reason: "matrix" }),
    expect: { viewer: 403, researcher: 403, pi: { member: 200, outsider: 404 }, coordinator: 403, admin: 403 } },
  { file: `${A}/verify-manuscript.ts`, def: manuscriptActions.verifyManuscriptAction, input: async (fx) => ({ id: await matrixManuscript(fx, "frozen") }),
    expect: { viewer: 403, researcher: { member: 403, outsider: 404 }, pi: { member: 200, outsider: 404 }, coordinator: 403, admin: 200 } },
];

// The authorization matrix: every route handler and every server action, called as each role,
// as a member and as an outsider of the target's group, and anonymously. Adding a route or an
// action without a row here fails the completeness tests at the bottom.
import fs from "node:fs";
import path from "node:path";
import crypto from "node:crypto";
import { beforeAll, describe, expect, it } from "vitest";
import { api } from "../../support/http";
import { invokeAction, type ActionDef } from "@/lib/auth/action";
import { makeMatrixPeople, type Person } from "./people-fixture";
import * as accountActions from "@/lib/actions/account";
import * as peopleActions from "@/lib/actions/people";
import * as ensembleActions from "@/lib/actions/ensembles";
import { CLUSTER_ACTIONS, CLUSTER_ROUTES } from "../batch-pipeline/matrix-rows";
import { makeAllocation, makeEnsemble } from "../../support/db";
import { transitionRun } from "@/lib/runs/transition-run";
import { db } from "@/models";
import type { Role } from "@/lib/auth/roles";
import { MANUSCRIPT_ACTIONS, MANUSCRIPT_ROUTES } from "../provenance/matrix-rows";
import { MANUSCRIPT_UI_ACTIONS } from "../manuscripts/matrix-rows";
import { ALLOCATION_ACTIONS, ALLOCATION_ROUTES } from "../allocations/matrix-rows";
import { PLANNER_ROUTES } from "../planner/matrix-rows";

type Expect = Partial<Record<Role | "anonymous", number | { member: number; outsider: number }>>;
type Fx = Awaited<ReturnType<typeof makeMatrixPeople>>;
type RouteRow = { file: string; method: string; path: (fx: Fx, p: Person | null) => string | Promise<string>; body?: (fx: Fx, p: Person | null) => unknown; headers?: Record<string, string>; expect: Expect };

const ALL = (s: number): Expect => ({ anonymous: 401, viewer: s, researcher: s, pi: s, coordinator: s, admin: s });
const ONLY = (roles: Role[], ok: number, anon = 401): Expect => {
  const e: Expect = { anonymous: anon };
  for (const r of ["viewer", "researcher", "pi", "coordinator", "admin"] as Role[]) e[r] = roles.includes(r) ? ok : 403;
  return e;
};
const uniq = () => crypto.randomBytes(5).toString("hex");
const throwawayUser = async () => (await db().User.create({ email: `tmp.${uniq()}@matrix.example`, name: "tmp", role: "viewer", passwordHash: "x" })).id;
const ownToken = async (p: Person | null) => {
  if (!p) return crypto.randomUUID();
  const t = await db().ApiToken.create({ userId: p.id, name: "to revoke", tokenHash: crypto.randomBytes(32).toString("hex"), prefix: "edx_matrix" });
  return t.id;
};

export const ROUTES: RouteRow[] = [
  { file: "app/api/health/route.ts", method: "GET", path: () => "/api/health", expect: { anonymous: 200, viewer: 200, researcher: 200, pi: 200, coordinator: 200, admin: 200 } },
  { file: "app/api/v1/[...path]/route.ts", method: "GET", path: () => "/api/v1/no-such-thing", expect: { anonymous: 404, viewer: 404, researcher: 404, pi: 404, coordinator: 404, admin: 404 } },
  { file: "app/api/v1/[...path]/route.ts", method: "POST", path: () => "/api/v1/no-such-thing", body: () => ({}), expect: { anonymous: 404, viewer: 404, researcher: 404, pi: 404, coordinator: 404, admin: 404 } },
  { file: "app/api/v1/[...path]/route.ts", method: "PUT", path: () => "/api/v1/no/such", body: () => ({}), expect: { anonymous: 404, admin: 404 } },
  { file: "app/api/v1/[...path]/route.ts", method: "PATCH", path: () => "/api/v1/no/such", body: () => ({}), expect: { anonymous: 404, admin: 404 } },
  { file: "app/api/v1/[...path]/route.ts", method: "DELETE", path: () => "/api/v1/no/such", expect: { anonymous: 404, admin: 404 } },
  { file: "app/api/v1/me/route.ts", method: "GET", path: () => "/api/v1/me", expect: ALL(200) },
  // clusters (coordinators, admins): rows in tests/integration/batch-pipeline/matrix-rows.ts
  ...CLUSTER_ROUTES,
  { file: "app/api/v1/groups/route.ts", method: "GET", path: () => "/api/v1/groups", expect: ALL(200) },
  { file: "app/api/v1/allocations/route.ts", method: "GET", path: () => "/api/v1/allocations", expect: ALL(200) },
  // allocation lifecycle and usage (allocations engineer): rows in tests/integration/allocations/matrix-rows.ts
  ...ALLOCATION_ROUTES,
  { file: "app/api/v1/overview/route.ts", method: "GET", path: () => "/api/v1/overview", expect: ALL(200) },
  { file: "app/api/v1/tokens/route.ts", method: "GET", path: () => "/api/v1/tokens", expect: ONLY(["researcher", "pi", "coordinator", "admin"], 200) },
  { file: "app/api/v1/tokens/route.ts", method: "POST", path: () => "/api/v1/tokens", body: () => ({ name: "matrix" }), expect: ONLY(["researcher", "pi", "coordinator", "admin"], 201) },
  { file: "app/api/v1/tokens/[id]/route.ts", method: "DELETE", path: async (_f, p) => `/api/v1/tokens/${await ownToken(p)}`, expect: ONLY(["researcher", "pi", "coordinator", "admin"], 200) },
  { file: "app/api/v1/people/route.ts", method: "GET", path: () => "/api/v1/people", expect: ONLY(["admin"], 200) },
  { file: "app/api/v1/people/route.ts", method: "POST", path: () => "/api/v1/people", body: () => ({ email: `new.${uniq()}@matrix.example`, name: "New", role: "viewer", password: "long-enough-pass" }), expect: ONLY(["admin"], 201) },
  { file: "app/api/v1/people/[id]/route.ts", method: "PATCH", path: async () => `/api/v1/people/${await throwawayUser()}`, body: () => ({ name: "Renamed" }), expect: ONLY(["admin"], 200) },
  { file: "app/api/v1/people/[id]/memberships/[groupId]/route.ts", method: "PUT", path: async (fx) => `/api/v1/people/${await throwawayUser()}/memberships/${fx.groupA.id}`, body: () => ({ member: true }), expect: ONLY(["admin"], 200) },
  { file: "app/api/v1/people/[id]/memberships/[groupId]/route.ts", method: "DELETE", path: async (fx) => `/api/v1/people/${await throwawayUser()}/memberships/${fx.groupA.id}`, expect: ONLY(["admin"], 200) },
  { file: "app/api/v1/mailbox/route.ts", method: "GET", path: () => "/api/v1/mailbox?q=ergodex", expect: ONLY(["admin"], 200) },
  // a well-formed id nobody received: admins learn it is not there, everyone else is refused first
  { file: "app/api/v1/mailbox/[id]/route.ts", method: "GET", path: () => "/api/v1/mailbox/20250101t000000000z-00000000", expect: ONLY(["admin"], 404) },
  { file: "app/api/auth/[...nextauth]/route.ts", method: "GET", path: () => "/api/auth/session", expect: { anonymous: 200, viewer: 200, admin: 200 } },
  // a credentials post without a valid CSRF token is turned away by next-auth with a redirect, never a session
  { file: "app/api/auth/[...nextauth]/route.ts", method: "POST", path: () => "/api/auth/callback/credentials", body: () => "csrfToken=forged&email=a%40b.example&password=x", headers: { "content-type": "application/x-www-form-urlencoded" }, expect: { anonymous: 302 } },
  // ensembles and runs (spec engineer): reads need group membership (coordinators and admins see all); cancel/resubmit act on a
  // fresh group-A ensemble owned by its researcher (owner, leading PI, admin may); submit of an invalid spec passes the guard, then 422
  { file: "app/api/v1/schemas/ensemble-spec/route.ts", method: "GET", path: () => "/api/v1/schemas/ensemble-spec", expect: { anonymous: 200, viewer: 200, researcher: 200, pi: 200, coordinator: 200, admin: 200 } },
  { file: "app/api/v1/ensembles/route.ts", method: "GET", path: () => "/api/v1/ensembles?pageSize=5&sort=name&order=asc", expect: ALL(200) },
  { file: "app/api/v1/imports/route.ts", method: "GET", path: () => "/api/v1/imports?pageSize=5", expect: ALL(200) },
  // A JSON body is not an upload: the roles that may upload get 400 (content type), the others 403 before reading it.
  { file: "app/api/v1/imports/route.ts", method: "POST", path: () => "/api/v1/imports", body: () => ({ not: "an upload" }), expect: ONLY(["researcher", "pi", "admin"], 400) },
  { file: "app/api/v1/ensembles/route.ts", method: "POST", path: () => "/api/v1/ensembles", body: () => ({ ...matrixSpec(), replicas: 0 }), expect: ONLY(["researcher", "pi", "admin"], 422) },
  { file: "app/api/v1/ensembles/preview/route.ts", method: "POST", path: () => "/api/v1/ensembles/preview", body: () => matrixSpec(), expect: ONLY(["researcher", "pi", "admin"], 200) },
  { file: "app/api/v1/ensembles/[id]/route.ts", method: "GET", path: async (fx) => `/api/v1/ensembles/${(await matrixEnsemble(fx, false)).id}`, expect: { anonymous: 401, viewer: { member: 200, outsider: 404 }, researcher: { member: 200, outsider: 404 }, pi: { member: 200, outsider: 404 }, coordinator: 200, admin: 200 } },
  { file: "app/api/v1/ensembles/[id]/estimates/route.ts", method: "GET", path: async (fx) => `/api/v1/ensembles/${(await matrixEnsemble(fx, false)).id}/estimates?format=csv`, expect: { anonymous: 401, viewer: { member: 200, outsider: 404 }, researcher: { member: 200, outsider: 404 }, pi: { member: 200, outsider: 404 }, coordinator: 200, admin: 200 } },
  { file: "app/api/v1/runs/[id]/route.ts", method: "GET", path: async (fx) => `/api/v1/runs/${(await db().Run.findOne({ where: { ensembleId: (await matrixEnsemble(fx, false)).id } }))!.id}`, expect: { anonymous: 401, viewer: { member: 200, outsider: 404 }, researcher: { member: 200, outsider: 404 }, pi: { member: 200, outsider: 404 }, coordinator: 200, admin: 200 } },
  { file: "app/api/v1/ensembles/[id]/cancel/route.ts", method: "POST", path: async (fx) => `/api/v1/ensembles/${(await matrixEnsemble(fx, false)).id}/cancel`, expect: { anonymous: 401, viewer: 403, researcher: { member: 200, outsider: 404 }, pi: { member: 200, outsider: 404 }, coordinator: 403, admin: 200 } },
  { file: "app/api/v1/ensembles/[id]/resubmit/route.ts", method: "POST", path: async (fx) => `/api/v1/ensembles/${(await matrixEnsemble(fx, true)).id}/resubmit`, expect: { anonymous: 401, viewer: 403, researcher: { member: 200, outsider: 404 }, pi: { member: 200, outsider: 404 }, coordinator: 403, admin: 200 } },
  // explorer (explorer-API engineer): the table, plots and views read within group scope; run analysis of a group-A run without an
  // observable passes the guard, then 422; a run without a spectrum is 404 for everyone; saving a malformed re-analysis passes the act guard, then 422
  { file: "app/api/v1/estimates/route.ts", method: "GET", path: () => "/api/v1/estimates?observable=e&pageSize=5&format=csv", expect: ALL(200) },
  { file: "app/api/v1/plots/estimates/route.ts", method: "GET", path: () => "/api/v1/plots/estimates?observable=e&x=T&groupBy=ensemble", expect: ALL(200) },
  { file: "app/api/v1/runs/[id]/analysis/route.ts", method: "GET", path: async (fx) => `/api/v1/runs/${await matrixRunId(fx)}/analysis`, expect: { anonymous: 401, viewer: { member: 422, outsider: 404 }, researcher: { member: 422, outsider: 404 }, pi: { member: 422, outsider: 404 }, coordinator: 422, admin: 422 } },
  { file: "app/api/v1/runs/[id]/spectrum/route.ts", method: "GET", path: async (fx) => `/api/v1/runs/${await matrixRunId(fx)}/spectrum`, expect: { anonymous: 401, viewer: 404, researcher: 404, pi: 404, coordinator: 404, admin: 404 } },
  { file: "app/api/v1/runs/[id]/estimates/route.ts", method: "POST", path: async (fx) => `/api/v1/runs/${await matrixRunId(fx)}/estimates`, body: () => ({ observable: "e", cut: "soon" }), expect: { anonymous: 401, viewer: 403, researcher: { member: 422, outsider: 404 }, pi: { member: 422, outsider: 404 }, coordinator: 403, admin: 422 } },
  { file: "app/api/v1/views/route.ts", method: "GET", path: () => "/api/v1/views", expect: ALL(200) },
  { file: "app/api/v1/views/route.ts", method: "POST", path: () => "/api/v1/views", body: () => ({ name: `matrix view ${uniq()}`, query: { observable: "e" } }), expect: ALL(201) },
  { file: "app/api/v1/views/[id]/route.ts", method: "GET", path: async (fx) => `/api/v1/views/${await matrixViewId(fx)}`, expect: { anonymous: 401, viewer: { member: 200, outsider: 404 }, researcher: { member: 200, outsider: 404 }, pi: { member: 200, outsider: 404 }, coordinator: 200, admin: 200 } },
  // manuscripts, provenance, audit (provenance engineer): rows in tests/integration/provenance/matrix-rows.ts
  ...MANUSCRIPT_ROUTES,
  // planner (planner engineer): rows in tests/integration/planner/matrix-rows.ts
  ...PLANNER_ROUTES,
];

// A tiny valid ising2d spec for the ensemble actions (placement problems are listed by preview, not thrown).
const matrixSpec = () => ({ format: "ergodex.ensemble/1", name: `matrix ${uniq()}`, sampler: { name: "ising2d", version: "1.0.0" }, fixed: { L: 4, T: 2, algorithm: "metropolis" },
  replicas: 1, thermalization: 0, measurements: 10, seed: "1", resources: { cores: 1, wallMinutes: 1 } });
const ACT_ON_A: Expect = { viewer: 403, researcher: { member: 200, outsider: 404 }, pi: { member: 200, outsider: 404 }, coordinator: 403, admin: 200 };
let matrixAllocation: Awaited<ReturnType<typeof makeAllocation>> | null = null;
/** One point, one run, no cluster (nothing for the broker to start); with `failed` the run has failed and the allocation can re-reserve it. */
async function matrixEnsemble(fx: Fx, failed: boolean) {
  const owner = (await db().User.findByPk(fx.people.find((p) => p.role === "researcher" && p.where === "member")!.id))!;
  const sampler = (await db().Sampler.findOne({ where: { name: "ising2d", version: "1.0.0" } }))!;
  matrixAllocation ??= await makeAllocation(fx.groupA, 1000);
  const { ensemble, runs } = await makeEnsemble({ owner, group: fx.groupA, sampler, cluster: null, allocation: failed ? matrixAllocation : null, points: [{ L: 4, T: 2 }], replicas: 1 });
  await ensemble.update({ spec: { ...matrixSpec(), ...ensemble.spec } });
  if (failed) await transitionRun(runs[0].id, "failed", { cause: "test.fail", patch: { failureReason: "nonzero_exit" } });
  return ensemble;
}

const matrixRunId = async (fx: Fx) => (await db().Run.findOne({ where: { ensembleId: (await matrixEnsemble(fx, false)).id } }))!.id;
/** A saved view shared with group A, owned by its member researcher. */
async function matrixViewId(fx: Fx) {
  const owner = fx.people.find((p) => p.role === "researcher" && p.where === "member")!;
  const v = await db().SavedView.create({ name: `matrix ${uniq()}`, query: { scope: "point" }, queryString: "", ownerId: owner.id, groupId: fx.groupA.id });
  return v.id;
}

type ActionRow = { file: string; def: ActionDef<any, any>; input: (fx: Fx, p: Person) => unknown | Promise<unknown>; expect: Expect };
const ACTIONS: ActionRow[] = [
  { file: "app/(app)/account/actions/change-password.ts", def: accountActions.changePasswordAction, input: (fx) => ({ current: fx.password, next: fx.password }), expect: ALL(200) },
  { file: "app/(app)/account/actions/create-token.ts", def: accountActions.createTokenAction, input: () => ({ name: "matrix action" }), expect: ONLY(["researcher", "pi", "coordinator", "admin"], 200) },
  { file: "app/(app)/account/actions/revoke-token.ts", def: accountActions.revokeTokenAction, input: async (_f, p) => ({ id: await ownToken(p) }), expect: ONLY(["researcher", "pi", "coordinator", "admin"], 200) },
  { file: "app/(app)/people/actions/create-person.ts", def: peopleActions.createPersonAction, input: () => ({ email: `act.${uniq()}@matrix.example`, name: "Act", role: "viewer", password: "long-enough-pass" }), expect: ONLY(["admin"], 200) },
  { file: "app/(app)/people/actions/update-person.ts", def: peopleActions.updatePersonAction, input: async () => ({ id: await throwawayUser(), change: { name: "Changed" } }), expect: ONLY(["admin"], 200) },
  { file: "app/(app)/people/actions/set-membership.ts", def: peopleActions.setMembershipAction, input: async (fx) => ({ userId: await throwawayUser(), groupId: fx.groupA.id, member: true }), expect: ONLY(["admin"], 200) },
  ...CLUSTER_ACTIONS,
  ...ALLOCATION_ACTIONS,
  // ensembles: preview needs a submitting role; submit of an invalid spec passes the guard and is refused by parseSpec (422)
  { file: "app/(app)/ensembles/actions/preview-ensemble.ts", def: ensembleActions.previewEnsembleAction, input: () => ({ spec: matrixSpec() }), expect: ONLY(["researcher", "pi", "admin"], 200) },
  { file: "app/(app)/ensembles/actions/submit-ensemble.ts", def: ensembleActions.submitEnsembleAction, input: () => ({ spec: { ...matrixSpec(), replicas: 0 } }), expect: ONLY(["researcher", "pi", "admin"], 422) },
  // cancel / resubmit act on a fresh ensemble of group A owned by its researcher: owner, leading PI and admin may; outsiders get 404
  { file: "app/(app)/ensembles/actions/cancel-ensemble.ts", def: ensembleActions.cancelEnsembleAction, input: async (fx) => ({ id: (await matrixEnsemble(fx, false)).id }), expect: ACT_ON_A },
  { file: "app/(app)/ensembles/actions/resubmit-failed.ts", def: ensembleActions.resubmitFailedAction, input: async (fx) => ({ id: (await matrixEnsemble(fx, true)).id }), expect: ACT_ON_A },
  ...MANUSCRIPT_ACTIONS,
  ...MANUSCRIPT_UI_ACTIONS,
];

const want = (e: Expect, p: Person | null): number | undefined => {
  const v = e[p ? p.role : "anonymous"];
  return typeof v === "object" ? v[p!.where] : v;
};
const statusOfAction = (r: { data?: unknown; error?: { code: string } }) =>
  "data" in r ? 200 : ({ unauthenticated: 401, forbidden: 403, not_found: 404, invalid: 422 } as Record<string, number>)[r.error!.code] ?? 500;

let fx: Fx;
beforeAll(async () => { fx = await makeMatrixPeople(); }, 120_000);

describe("route handlers × roles × group membership", () => {
  for (const row of ROUTES) {
    it(`${row.method} ${row.file}`, async () => {
      const callers: (Person | null)[] = [null, ...fx.people];
      const seen: string[] = [];
      for (const p of callers) {
        const expected = want(row.expect, p);
        if (expected === undefined) continue;
        // sessions for half the calls, API tokens for the other half: both paths go through the one guard
        const caller = p ? (p.where === "member" ? { cookie: p.cookie } : { token: p.token }) : {};
        const res = await api(row.method, await row.path(fx, p), caller, row.body?.(fx, p), row.headers);
        seen.push(`${p ? `${p.role}/${p.where}` : "anonymous"}: ${res.status}${res.status === expected ? "" : ` (expected ${expected}) ${res.text.slice(0, 120)}`}`);
      }
      expect(seen.filter((s) => s.includes("expected"))).toEqual([]);
    });
  }
});

describe("server actions × roles × group membership", () => {
  for (const row of ACTIONS) {
    it(`${row.def.name} (${row.file})`, async () => {
      const seen: string[] = [];
      const anon = await invokeAction(row.def, null, await row.input(fx, fx.people[0]));
      if (statusOfAction(anon) !== 401) seen.push(`anonymous: ${statusOfAction(anon)}`);
      for (const p of fx.people) {
        const expected = want(row.expect, p);
        if (expected === undefined) continue;
        const got = statusOfAction(await invokeAction(row.def, p.who, await row.input(fx, p)));
        if (got !== expected) seen.push(`${p.role}/${p.where}: ${got} (expected ${expected})`);
      }
      expect(seen).toEqual([]);
    });
  }
});

describe("group scope of listings", () => {
  it("a member sees their group, an outsider does not; coordinators and admins see both", async () => {
    for (const p of fx.people) {
      const res = await api("GET", "/api/v1/groups", { token: p.token });
      const ids = (res.json!.data as { id: string }[]).map((g) => g.id);
      const seesA = ids.includes(fx.groupA.id);
      const expected = p.where === "member" || p.role === "coordinator" || p.role === "admin";
      expect(seesA, `${p.role}/${p.where}`).toBe(expected);
    }
  });
});

// Completeness: every exported HTTP method of every route file, and every "use server" file, has a row.
function walk(dir: string): string[] {
  return fs.readdirSync(dir, { withFileTypes: true }).flatMap((d) => (d.isDirectory() ? walk(path.join(dir, d.name)) : [path.join(dir, d.name)]));
}
describe("the matrix covers everything", () => {
  const files = walk("app").map((f) => f.split(path.sep).join("/"));
  it("every route handler method has a row", () => {
    const missing: string[] = [];
    for (const f of files.filter((f) => f.endsWith("/route.ts"))) {
      const src = fs.readFileSync(f, "utf8");
      const methods = new Set([...src.matchAll(/export (?:const|async function) (GET|POST|PUT|PATCH|DELETE)\b/g)].map((m) => m[1]));
      for (const m of src.matchAll(/as (GET|POST|PUT|PATCH|DELETE)\b/g)) methods.add(m[1]);
      for (const m of methods) if (!ROUTES.some((r) => r.file === f && r.method === m)) missing.push(`${m} ${f}`);
    }
    expect(missing).toEqual([]);
  });
  it("every server action file has a row", () => {
    const actionFiles = files.filter((f) => /^\s*["']use server["']/.test(fs.readFileSync(f, "utf8")));
    expect(actionFiles.length).toBeGreaterThan(0);
    expect(actionFiles.filter((f) => !ACTIONS.some((a) => a.file === f))).toEqual([]);
  });
});

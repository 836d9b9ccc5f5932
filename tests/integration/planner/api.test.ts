// POST /api/v1/planner at the edge: bad bodies are refused with the field's path, a request nothing in scope
// can answer says what to do, and a pilot of another group is not revealed; the record lists only its groups.
import crypto from "node:crypto";
import { beforeAll, describe, expect, it } from "vitest";
import { api } from "../../support/http";
import { createApiToken } from "@/lib/auth/tokens";
import { db } from "@/models";
import { makeEnsemble } from "@/tests/support/db";

let token = "";
let otherGroupEnsemble = "";
beforeAll(async () => {
  const tag = crypto.randomBytes(4).toString("hex");
  const m = db();
  const mine = await m.Group.create({ slug: `pl-a-${tag}`, name: `Planner A ${tag}`, institute: "test" });
  const other = await m.Group.create({ slug: `pl-b-${tag}`, name: `Planner B ${tag}`, institute: "test" });
  const user = await m.User.create({ email: `planner.${tag}@planner.example`, name: "Planner", role: "researcher", passwordHash: "x" });
  await m.Membership.create({ userId: user.id, groupId: mine.id, isLead: false });
  const stranger = await m.User.create({ email: `stranger.${tag}@planner.example`, name: "Stranger", role: "researcher", passwordHash: "x" });
  await m.Membership.create({ userId: stranger.id, groupId: other.id, isLead: false });
  token = (await createApiToken({ actorId: user.id, ip: null, requestId: null }, user.id, "planner", 1)).token;
  const sampler = (await m.Sampler.findOne({ where: { name: "ising2d", version: "1.0.0" } }))!;
  otherGroupEnsemble = (await makeEnsemble({ owner: stranger, group: other, sampler, cluster: null, points: [{ L: 4, T: 3 }], replicas: 1 })).ensemble.id;
});

const plan = (body: Record<string, unknown>) => api("POST", "/api/v1/planner", { token }, body);
const good = { sampler: "ising2d", observable: "e", targetError: 0.01, replicas: 2, params: { L: 4, T: 3, algorithm: "metropolis" } };

describe("POST /api/v1/planner", () => {
  it("refuses a non-positive target error and an unknown field by path (422)", async () => {
    const r = await plan({ ...good, targetError: 0, colour: "blue" });
    expect(r.status).toBe(422);
    const paths = (r.json!.error as { issues: { path: string }[] }).issues.map((i) => i.path);
    expect(paths).toEqual(expect.arrayContaining(["/targetError", "/colour"]));
  });

  it("a new group with no finished runs is told to run a pilot first", async () => {
    const r = await plan(good);
    expect(r.status).toBe(422);
    expect((r.json!.error as { message: string }).message).toMatch(/no estimates of e in finished ising2d runs of your groups: run a short pilot ensemble first/);
  });

  it("another group's ensemble as the pilot is not found (404), not described", async () => {
    const r = await plan({ ...good, pilotEnsembleId: otherGroupEnsemble });
    expect(r.status).toBe(404);
    expect(r.text).not.toContain("ising2d");
  });

  it("the record of a group with no planned ensembles is empty", async () => {
    const r = await api("GET", "/api/v1/planner/record", { token });
    expect(r.status).toBe(200);
    expect(r.json!.data).toEqual([]);
  });
});

// Bad input at the edge: each gets a clear JSON error with the right status, and nothing is written.
import crypto from "node:crypto";
import { beforeAll, describe, expect, it } from "vitest";
import { api } from "../../support/http";
import { db } from "@/models";
import { hashPassword } from "@/lib/auth/passwords";
import { createApiToken, revokeApiToken } from "@/lib/auth/tokens";

let admin: { id: string; token: string };
const counts = async () => ({ users: await db().User.count(), audits: await db().AuditEntry.count(), tokens: await db().ApiToken.count() });

beforeAll(async () => {
  const u = await db().User.create({ email: `bad.${crypto.randomBytes(4).toString("hex")}@input.example`, name: "Bad-input admin", role: "admin", passwordHash: await hashPassword("irrelevant-pass") });
  const { token } = await createApiToken({ actorId: u.id, ip: null, requestId: null }, u.id, "bad input", 1);
  admin = { id: u.id, token };
});

describe("bad input", () => {
  it("malformed JSON is 400 and says so; nothing is written", async () => {
    const before = await counts();
    const res = await api("POST", "/api/v1/people", { token: admin.token }, '{"email": "x@y.example", "name": ');
    expect(res.status).toBe(400);
    expect(res.json?.error?.code).toBe("bad_request");
    expect(res.json?.error?.message).toMatch(/not valid JSON/);
    expect(await counts()).toEqual(before);
  });

  it("a missing field is 422 with its JSON path; nothing is written", async () => {
    const before = await counts();
    const res = await api("POST", "/api/v1/people", { token: admin.token }, { email: "someone@input.example", name: "Someone", role: "viewer" });
    expect(res.status).toBe(422);
    expect(res.json?.error?.issues).toContainEqual({ path: "/password", message: "is required" });
    expect(await counts()).toEqual(before);
  });

  it("a wrong type and an unknown field are both reported with their paths", async () => {
    const res = await api("POST", "/api/v1/people", { token: admin.token }, { email: "someone@input.example", name: 7, role: "overlord", password: "long-enough-pass", extra: 1 });
    expect(res.status).toBe(422);
    const paths = res.json!.error!.issues!.map((i) => i.path);
    expect(paths).toEqual(expect.arrayContaining(["/name", "/role", "/extra"]));
  });

  it("an oversized body is 413; nothing is written", async () => {
    const before = await counts();
    const huge = JSON.stringify({ email: "big@input.example", name: "x".repeat(2_000_000), role: "viewer", password: "long-enough-pass" });
    const res = await api("POST", "/api/v1/people", { token: admin.token }, huge);
    expect(res.status).toBe(413);
    expect(res.json?.error?.code).toBe("too_large");
    expect(await counts()).toEqual(before);
  });

  it("an unknown route is a JSON 404 naming the route", async () => {
    const res = await api("GET", "/api/v1/ensembles-that-do-not-exist/42", { token: admin.token });
    expect(res.status).toBe(404);
    expect(res.json?.error?.message).toContain("/api/v1/ensembles-that-do-not-exist/42");
  });

  it("an expired token is 401 'expired'; a revoked one 401 'revoked'; a made-up one 401", async () => {
    const expired = await createApiToken({ actorId: admin.id, ip: null, requestId: null }, admin.id, "short-lived", 1);
    await db().ApiToken.update({ expiresAt: new Date(Date.now() - 1000) }, { where: { id: expired.id } });
    const e = await api("GET", "/api/v1/me", { token: expired.token });
    expect(e.status).toBe(401);
    expect(e.json?.error?.message).toMatch(/expired/);

    const revoked = await createApiToken({ actorId: admin.id, ip: null, requestId: null }, admin.id, "to revoke", null);
    expect((await api("GET", "/api/v1/me", { token: revoked.token })).status).toBe(200);
    await revokeApiToken({ actorId: admin.id, ip: null, requestId: null }, admin.id, revoked.id);
    const r = await api("GET", "/api/v1/me", { token: revoked.token });
    expect(r.status).toBe(401);
    expect(r.json?.error?.message).toMatch(/revoked/);

    const before = await counts();
    const m = await api("POST", "/api/v1/people", { token: "edx_" + "A".repeat(32) }, { email: "x@input.example", name: "x", role: "viewer", password: "long-enough-pass" });
    expect(m.status).toBe(401);
    expect(await counts()).toEqual(before);
  });

  it("a malformed id in the path is 404, not a database error", async () => {
    const res = await api("PATCH", "/api/v1/people/not-a-uuid", { token: admin.token }, { name: "x" });
    expect(res.status).toBe(404);
  });

  it("a token is shown once: the list never contains the secret", async () => {
    const created = await api("POST", "/api/v1/tokens", { token: admin.token }, { name: "shown once" });
    expect(created.status).toBe(201);
    const secret = created.json!.data.token as string;
    const list = await api("GET", "/api/v1/tokens", { token: admin.token });
    expect(list.text).not.toContain(secret);
    expect(list.text).toContain(secret.slice(0, 12));
    // and only its hash is stored
    const row = await db().ApiToken.findByPk(created.json!.data.id);
    expect(row!.tokenHash).toBe(crypto.createHash("sha256").update(secret).digest("hex"));
  });
});

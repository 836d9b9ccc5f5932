// People and access tables refuse bad rows; the audit trail cannot be edited or deleted.
import { describe, expect, it } from "vitest";
import { makeGroup, makeUser, useTestDatabase } from "../../support/db";
import { refusal, SQLSTATE } from "./pg-error";

const t = useTestDatabase();
const q = (sql: string, bind: unknown[] = []) => t.sequelize.query(sql, { bind });

describe("users, groups, memberships", () => {
  it("stores e-mail lower-case and refuses a duplicate, whatever its case", async () => {
    const u = await t.models.User.create({ email: "  Emmy.Noether@Example.ORG ", name: "Emmy", role: "pi", passwordHash: null });
    expect(u.email).toBe("emmy.noether@example.org");
    const r = await refusal(t.models.User.create({ email: "EMMY.NOETHER@example.org", name: "Twin", role: "viewer", passwordHash: null }));
    expect(r).toMatchObject({ code: SQLSTATE.unique, constraint: "users_email_key" });
  });

  it("refuses a mixed-case e-mail written past the model, and an unknown role", async () => {
    expect(await refusal(q("INSERT INTO users (email, name, role) VALUES ('Mixed@Case.example', 'M', 'viewer')")))
      .toMatchObject({ code: SQLSTATE.check, constraint: "users_email_check" });
    expect(await refusal(t.models.User.create({ email: "x@role.example", name: "X", role: "overlord" as never, passwordHash: null })))
      .toMatchObject({ code: SQLSTATE.check, constraint: "users_role_check" });
  });

  it("defaults a user to active", async () => {
    const u = await makeUser("viewer");
    expect((await t.models.User.findByPk(u.id))!.active).toBe(true);
  });

  it("refuses a membership to a missing group and a second membership of the same pair", async () => {
    const g = await makeGroup();
    const u = await makeUser("researcher", g);
    expect(await refusal(t.models.Membership.create({ userId: u.id, groupId: "00000000-0000-4000-8000-000000000000" })))
      .toMatchObject({ code: SQLSTATE.foreignKey, constraint: "memberships_group_id_fkey" });
    expect(await refusal(t.models.Membership.create({ userId: u.id, groupId: g.id, isLead: true })))
      .toMatchObject({ code: SQLSTATE.unique, constraint: "memberships_pkey" });
  });

  it("makes a pi the lead of their group, reachable through the groups association", async () => {
    const g = await makeGroup();
    const pi = await makeUser("pi", g);
    const found = await t.models.User.findByPk(pi.id, { include: ["groups", "memberships"] });
    expect(found!.groups!.map((x) => x.id)).toEqual([g.id]);
    expect(found!.memberships![0].isLead).toBe(true);
  });

  it("refuses a group slug that is not URL-safe, and a duplicate slug", async () => {
    expect(await refusal(makeGroup({ slug: "Quantum Gravity" }))).toMatchObject({ code: SQLSTATE.check, constraint: "groups_slug_check" });
    await makeGroup({ slug: "spectral" });
    expect(await refusal(makeGroup({ slug: "spectral" }))).toMatchObject({ code: SQLSTATE.unique, constraint: "groups_slug_key" });
  });
});

describe("API tokens and sign-in attempts", () => {
  it("refuses a token hash that is not sha256 hex, and a duplicate hash", async () => {
    const u = await makeUser("researcher");
    expect(await refusal(t.models.ApiToken.create({ userId: u.id, name: "cli", tokenHash: "Z".repeat(64), prefix: "edx_abc" })))
      .toMatchObject({ code: SQLSTATE.check, constraint: "api_tokens_token_hash_check" });
    const hash = "ab".repeat(32);
    await t.models.ApiToken.create({ userId: u.id, name: "cli", tokenHash: hash, prefix: "edx_abc" });
    expect(await refusal(t.models.ApiToken.create({ userId: u.id, name: "cli 2", tokenHash: hash, prefix: "edx_abd" })))
      .toMatchObject({ code: SQLSTATE.unique, constraint: "api_tokens_token_hash_key" });
  });

  it("records attempts and has the (email, time) and (ip, time) indexes rate limiting needs", async () => {
    const { SignInAttempt } = t.models;
    await SignInAttempt.bulkCreate([
      { email: "a@x.example", ip: "127.0.0.1", succeeded: false },
      { email: "a@x.example", ip: "127.0.0.2", succeeded: false },
      { email: "b@x.example", ip: "127.0.0.1", succeeded: true },
    ]);
    expect(await SignInAttempt.count({ where: { email: "a@x.example", succeeded: false } })).toBe(2);
    const [indexes] = await q("SELECT indexdef FROM pg_indexes WHERE tablename = 'sign_in_attempts' ORDER BY indexname");
    expect((indexes as { indexdef: string }[]).map((r) => r.indexdef.replace(/^.* USING btree /, ""))).toEqual(["(email, created_at)", "(ip, created_at)", "(id)"]);
  });
});

describe("audit entries are append-only", () => {
  it("accepts an insert but refuses UPDATE, DELETE and TRUNCATE, through the model and in SQL", async () => {
    const actor = await makeUser("admin");
    const e = await t.models.AuditEntry.create({ actorId: actor.id, action: "people.create", targetType: "user", targetId: actor.id, detail: { role: "admin" } });
    expect(e.id).toMatch(/^\d+$/);

    const update = await refusal(e.update({ action: "people.delete" }));
    expect(update.code).toBe(SQLSTATE.raised);
    expect(update.message).toMatch(/audit_entries is append-only: UPDATE refused/);
    expect((await refusal(e.destroy())).message).toMatch(/DELETE refused/);
    expect((await refusal(q("UPDATE audit_entries SET detail = '{}'"))).code).toBe(SQLSTATE.raised);
    expect((await refusal(q("TRUNCATE audit_entries"))).message).toMatch(/TRUNCATE refused/);

    const kept = await t.models.AuditEntry.findByPk(e.id);
    expect(kept!.action).toBe("people.create");
    expect(kept!.detail).toEqual({ role: "admin" });
  });

  it("keeps an actor with audit entries from being deleted (people are deactivated instead)", async () => {
    const actor = await makeUser("coordinator");
    await t.models.AuditEntry.create({ actorId: actor.id, action: "cluster.create", targetType: "cluster", targetId: null });
    expect(await refusal(actor.destroy())).toMatchObject({ code: SQLSTATE.foreignKey, constraint: "audit_entries_actor_id_fkey" });
  });
});

// Model wiring: initModels is idempotent per instance, a second instance gets its own classes,
// and db() follows the process-wide instance that useTestDatabase installs.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Sequelize } from "sequelize";
import { createSequelize, getSequelize } from "@/lib/db/sequelize";
import { databaseUrl } from "@/lib/env";
import { db, initModels, User, type Models } from "@/models";
import { createDatabaseFrom, dropDatabase, makeGroup, makeUser, useTestDatabase } from "../../support/db";

const t = useTestDatabase();
let otherName: string;
let other: Sequelize;
let otherModels: Models;

beforeAll(async () => {
  otherName = await createDatabaseFrom();
  other = createSequelize(databaseUrl(otherName), { poolMax: 2 });
  otherModels = initModels(other);
});
afterAll(async () => {
  await other?.close();
  if (otherName) await dropDatabase(otherName);
});

describe("initModels and db()", () => {
  it("returns the same models for the same instance, and db() is the test database's set", () => {
    expect(initModels(t.sequelize)).toBe(t.models);
    expect(getSequelize()).toBe(t.sequelize);
    expect(db()).toBe(t.models);
    expect(t.models.User).toBe(User); // the first instance initialised owns the exported classes
  });

  it("gives a second instance its own subclasses, so rows go to the database they belong to", async () => {
    expect(otherModels.User).not.toBe(User);
    const u = await otherModels.User.create({ email: "second@db.example", name: "Second", role: "viewer", passwordHash: null });
    expect(u).toBeInstanceOf(User);
    expect(await otherModels.User.count({ where: { email: "second@db.example" } })).toBe(1);
    expect(await t.models.User.count({ where: { email: "second@db.example" } })).toBe(0);
  });

  it("resolves associations on both instances", async () => {
    const g = await makeGroup();
    const pi = await makeUser("pi", g);
    const withGroups = await User.findByPk(pi.id, { include: ["groups"] });
    expect(withGroups!.groups!.map((x) => x.slug)).toEqual([g.slug]);
    const og = await otherModels.Group.create({ slug: "other-db", name: "Other" });
    const ou = await otherModels.User.create({ email: "lead@db.example", name: "Lead", role: "pi", passwordHash: null });
    await otherModels.Membership.create({ userId: ou.id, groupId: og.id, isLead: true });
    const found = await otherModels.Group.findByPk(og.id, { include: ["members"] });
    expect(found!.members!.map((m) => m.email)).toEqual(["lead@db.example"]);
  });

  it("hands out numeric and bigint columns as numbers and identity ids as strings", async () => {
    const g = await makeGroup();
    const a = await t.models.Allocation.create({ groupId: g.id, name: "n", periodStart: new Date("2026-01-01Z"), periodEnd: new Date("2027-01-01Z"), perPersonCapCoreHours: 1234.5678 });
    const e = await t.models.LedgerEntry.create({ allocationId: a.id, kind: "grant", coreHours: 99999999.9999 });
    const back = await t.models.LedgerEntry.findByPk(e.id);
    expect(typeof back!.id).toBe("string");
    expect(back!.coreHours).toBe(99999999.9999);
    expect((await t.models.Allocation.findByPk(a.id))!.perPersonCapCoreHours).toBe(1234.5678);
  });
});

// The core-hour ledger: constraints on entries, and balances recomputed from entries against hand-worked figures.
import { beforeAll, describe, expect, it } from "vitest";
import { QueryTypes } from "sequelize";
import { allocationBalance, balancesForAllocations, usageByPerson } from "@/lib/allocations/balance";
import { makeAllocation, makeEnsemble, makeGroup, makeUser, useTestDatabase } from "../../support/db";
import type { Allocation, Group, LedgerEntryCreationAttributes, User } from "@/models";
import { refusal, SQLSTATE } from "./pg-error";

const t = useTestDatabase();
let group: Group;
let user: User;
let alloc: Allocation;

beforeAll(async () => {
  group = await makeGroup();
  user = await makeUser("researcher", group);
  alloc = await makeAllocation(group, 0);
});

describe("ledger entries", () => {
  const entry = (over: Partial<LedgerEntryCreationAttributes>) => t.models.LedgerEntry.create({ allocationId: alloc.id, kind: "grant", coreHours: 1, ...over });

  it("refuses an unknown kind, a negative amount of any kind but adjust, and a missing allocation", async () => {
    expect(await refusal(entry({ kind: "gift" as never }))).toMatchObject({ code: SQLSTATE.check, constraint: "ledger_entries_kind_check" });
    for (const kind of ["grant", "reserve", "charge", "release"] as const) {
      expect(await refusal(entry({ kind, coreHours: -0.0001 })), kind).toMatchObject({ code: SQLSTATE.check, constraint: "ledger_entries_sign" });
    }
    expect(await refusal(entry({ allocationId: "00000000-0000-4000-8000-000000000000" }))).toMatchObject({ code: SQLSTATE.foreignKey, constraint: "ledger_entries_allocation_id_fkey" });
  });

  it("is append-only: entries cannot be edited or deleted", async () => {
    const other = await makeAllocation(group, 0);
    const e = await t.models.LedgerEntry.create({ allocationId: other.id, kind: "adjust", coreHours: -5 });
    expect((await refusal(e.update({ coreHours: 5 }))).message).toMatch(/ledger_entries is append-only: UPDATE refused/);
    expect((await refusal(e.destroy())).message).toMatch(/DELETE refused/);
    expect((await allocationBalance(other.id)).adjusted).toBe(-5);
  });

  it("refuses an allocation whose period ends before it starts, and a non-positive per-person cap", async () => {
    const A = t.models.Allocation;
    const start = new Date("2026-01-01T00:00:00Z");
    expect(await refusal(A.create({ groupId: group.id, name: "backwards", periodStart: start, periodEnd: start }))).toMatchObject({ constraint: "allocations_period" });
    expect(await refusal(A.create({ groupId: group.id, name: "capped", periodStart: start, periodEnd: new Date("2027-01-01Z"), perPersonCapCoreHours: 0 })))
      .toMatchObject({ constraint: "allocations_per_person_cap_core_hours_check" });
  });
});

describe("allocation balance", () => {
  it("equals the hand-computed figures for grants, adjustments, a settled and a partly charged reservation", async () => {
    const a = await makeAllocation(group, 0);
    const { ensemble: ensA } = await makeEnsemble({ owner: user, group, allocation: a, cluster: null });
    const { ensemble: ensB } = await makeEnsemble({ owner: user, group, allocation: a, cluster: null });
    const add = (kind: LedgerEntryCreationAttributes["kind"], coreHours: number, ensembleId: string | null = null) =>
      t.models.LedgerEntry.create({ allocationId: a.id, kind, coreHours, ensembleId, userId: user.id });
    await add("grant", 1000);
    await add("grant", 250.5);
    await add("adjust", -50.25);
    await add("adjust", 10);
    await add("reserve", 400, ensA.id);
    await add("reserve", 120, ensB.id);
    await add("charge", 310.1234, ensA.id); // A settled: 310.1234 + 89.8766 = 400 reserved
    await add("release", 89.8766, ensA.id);
    await add("charge", 30, ensB.id); // B still running: 90 of its 120 held

    // By hand: granted 1000 + 250.5; adjusted −50.25 + 10; reserved 400 + 120; charged 310.1234 + 30;
    // held = 520 − 89.8766 − 340.1234 = 90; available = 1250.5 − 40.25 − 520 + 89.8766 = 780.1266.
    const b = await allocationBalance(a.id);
    expect(b).toEqual({ granted: 1250.5, adjusted: -40.25, reserved: 520, charged: 340.1234, released: 89.8766, held: 90, available: 780.1266 });

    // And the same totals summed independently from the rows themselves.
    const rows = await t.models.LedgerEntry.findAll({ where: { allocationId: a.id } });
    const sum = (k: string) => rows.filter((r) => r.kind === k).reduce((s, r) => s + r.coreHours, 0);
    expect(b.granted).toBeCloseTo(sum("grant"), 9);
    expect(b.available).toBeCloseTo(sum("grant") + sum("adjust") - sum("reserve") + sum("release"), 9);
    expect(b.held).toBeCloseTo(sum("reserve") - sum("release") - sum("charge"), 9);
  });

  it("balances several allocations in one call, zero for one without entries, without mixing them", async () => {
    const a = await makeAllocation(group, 500);
    const b = await makeAllocation(group, 0);
    await t.models.LedgerEntry.create({ allocationId: a.id, kind: "reserve", coreHours: 125, userId: user.id });
    const m = await balancesForAllocations([a.id, b.id]);
    expect(m.get(a.id)).toMatchObject({ granted: 500, reserved: 125, held: 125, available: 375 });
    expect(m.get(b.id)).toEqual({ granted: 0, adjusted: 0, reserved: 0, charged: 0, released: 0, held: 0, available: 0 });
    expect((await balancesForAllocations([])).size).toBe(0);
  });

  it("sees uncommitted entries inside the caller's transaction and nothing of them after a rollback", async () => {
    const a = await makeAllocation(group, 100);
    const inside = await t.sequelize.transaction(async (transaction) => {
      await t.models.LedgerEntry.create({ allocationId: a.id, kind: "reserve", coreHours: 60 }, { transaction });
      return allocationBalance(a.id, { transaction });
    });
    expect(inside.available).toBe(40);
    const tx = await t.sequelize.transaction();
    await t.models.LedgerEntry.create({ allocationId: a.id, kind: "reserve", coreHours: 30 }, { transaction: tx });
    expect((await allocationBalance(a.id, { transaction: tx })).available).toBe(10);
    await tx.rollback();
    expect((await allocationBalance(a.id)).available).toBe(40);
  });

  it("with lock: true, a second check-then-reserve waits for the first and sees its reservation", async () => {
    const a = await makeAllocation(group, 100);
    const t1 = await t.sequelize.transaction();
    const first = await allocationBalance(a.id, { transaction: t1, lock: true });
    const t2 = await t.sequelize.transaction();
    let settled = false;
    const second = allocationBalance(a.id, { transaction: t2, lock: true }).finally(() => { settled = true; });
    // Go on once the second read has either returned (nothing held it back) or is blocked on the row lock.
    const blocked = async () => (await t.sequelize.query<{ n: string }>(
      "SELECT count(*) AS n FROM pg_stat_activity WHERE datname = current_database() AND wait_event_type = 'Lock'",
      { type: QueryTypes.SELECT }))[0].n !== "0";
    while (!settled && !(await blocked())) await new Promise((r) => setTimeout(r, 10));
    await t.models.LedgerEntry.create({ allocationId: a.id, kind: "reserve", coreHours: 60 }, { transaction: t1 });
    await t1.commit();
    const seen = await second;
    await t2.rollback();
    expect(first.available).toBe(100);
    expect(seen.available).toBe(40); // without the lock the second read would have seen 100: overspending
    await expect(allocationBalance(a.id, { lock: true })).rejects.toThrow(/lock needs a transaction/);
  });

  it("splits use per person: charged plus still held, grants (no user) left out", async () => {
    const a = await makeAllocation(group, 1000);
    const other = await makeUser("researcher", group);
    const add = (userId: string, kind: LedgerEntryCreationAttributes["kind"], coreHours: number) =>
      t.models.LedgerEntry.create({ allocationId: a.id, kind, coreHours, userId });
    await add(user.id, "reserve", 100);
    await add(user.id, "charge", 70);
    await add(user.id, "release", 30); // settled: used 70
    await add(other.id, "reserve", 50);
    await add(other.id, "charge", 12.5); // 37.5 still held: used 50
    const m = await usageByPerson(a.id);
    expect([...m.keys()].sort()).toEqual([user.id, other.id].sort());
    expect(m.get(user.id)).toEqual({ reserved: 100, charged: 70, released: 30, held: 0, used: 70 });
    expect(m.get(other.id)).toEqual({ reserved: 50, charged: 12.5, released: 0, held: 37.5, used: 50 });
  });

  it("says which allocation is unknown or malformed", async () => {
    await expect(allocationBalance("00000000-0000-4000-8000-000000000000")).rejects.toMatchObject({ code: "not_found", message: expect.stringContaining("00000000-0000-4000-8000-000000000000") });
    await expect(balancesForAllocations([alloc.id, "not-a-uuid"])).rejects.toMatchObject({ code: "bad_request", message: expect.stringContaining("not-a-uuid") });
  });
});

// Allocation alerts through the outbox: 80 % and 100 % of the grant charged, once per crossing,
// re-armed by a top-up that brings use back below; the near-cap notice to a person (≥ 80 % of their
// cap used or held), once per crossing; the weekly coordinator digest. Reads the real outbox rows.
import { afterAll, describe, expect, it } from "vitest";
import { Op, QueryTypes } from "sequelize";
import { makeAllocation, makeGroup, makeUser, useTestDatabase } from "../../support/db";
import { stopBoss } from "@/lib/queue/boss";
import { allocationUse } from "@/lib/mail/allocation-alerts";
import { allocationDigestText, isoWeek } from "@/lib/mail/allocation-digest";
import { changeBalance, setCap } from "@/lib/allocations/manage-allocations";
import { checkAllocationJob } from "@/broker/jobs/check-allocation";
import { allocationDigestJob } from "@/broker/jobs/allocation-digest";
import type { Allocation } from "@/models";
import { db } from "@/models";

useTestDatabase();
const ctx = { jobId: "test", retryCount: 0, log: undefined as never };
afterAll(() => stopBoss({ graceful: false }));
const sys = { actorId: null, ip: null, requestId: null };

type Check = { use: number; sent: 80 | 100 | null; rearmed: number[]; notices: { notified: string[]; rearmed: string[] } };
const entry = (a: Allocation, kind: "reserve" | "charge" | "release", coreHours: number, userId: string | null = null) =>
  db().LedgerEntry.create({ allocationId: a.id, kind, coreHours, userId });
const check = (a: Allocation) => checkAllocationJob.handle({ allocationId: a.id }, ctx) as Promise<Check>;
const mailsOf = (a: Allocation, kind: string) => db().OutboxMessage.findAll({ where: { kind, dedupeKey: { [Op.like]: `%${a.id}%` } }, order: [["id", "ASC"]] });

describe("80 % and 100 % of the grant", () => {
  it("a reservation alone does not mail; a charge crossing 80 % mails once; a top-up re-arms; the next crossing mails again", async () => {
    const group = await makeGroup();
    const pi = await makeUser("pi", group);
    const researcher = await makeUser("researcher", group);
    const coordinator = await makeUser("coordinator");
    await makeUser("coordinator", null, { active: false });
    const a = await makeAllocation(group, 1_000);

    await entry(a, "reserve", 900);
    expect(await check(a)).toMatchObject({ use: 0, sent: null }); // held hours are not spent
    await db().LedgerEntry.bulkCreate([{ allocationId: a.id, kind: "charge", coreHours: 790 }]);
    expect(await check(a)).toMatchObject({ use: 0.79, sent: null });
    await entry(a, "charge", 20); // 810 of 1,000 charged: crossed by this charge
    expect(await check(a)).toMatchObject({ use: 0.81, sent: 80 });
    await entry(a, "charge", 50);
    expect(await check(a)).toMatchObject({ use: 0.86, sent: null }); // not twice in one crossing
    expect(await mailsOf(a, "allocation.80")).toHaveLength(1);

    await changeBalance(sys, a.id, { kind: "top-up", coreHours: 250 }); // 860 / 1,250 = 68.8 %
    expect(await check(a)).toMatchObject({ sent: null, rearmed: [80] });
    expect((await db().Allocation.findByPk(a.id))!.alertedAt80).toBeNull();
    await entry(a, "release", 40);
    await entry(a, "charge", 0.5); // 860.5: still below
    expect(await check(a)).toMatchObject({ sent: null, rearmed: [] });
    await db().LedgerEntry.create({ allocationId: a.id, kind: "reserve", coreHours: 300 });
    await entry(a, "charge", 150); // 1,010.5 / 1,250 = 80.84 %: the second crossing
    const second = await check(a);
    expect(second.sent).toBe(80);
    expect(second.use).toBeCloseTo(0.8084, 12);

    const mails = await mailsOf(a, "allocation.80");
    expect(mails).toHaveLength(2);
    for (const m of mails) {
      expect(new Set(m.to)).toEqual(new Set([pi.email, coordinator.email]));
      expect(m.to).not.toContain(researcher.email);
      expect(m.subject).toBe(`[Ergodex] Allocation "${a.name}" at 80 % use`);
    }
    expect(mails[0].textBody).toContain("81.0 % of what it was given is charged");
    expect(mails[1].textBody).toContain("80.8 % of what it was given is charged");
    expect(mails[1].textBody).toContain("Given:     1,250 core-hours (granted 1,250, adjusted 0)");
    expect(mails[0].dedupeKey).not.toBe(mails[1].dedupeKey);
  });

  it("100 % mails once; a first check already at 100 % sends only the 100 % mail and marks 80 % covered", async () => {
    const group = await makeGroup();
    await makeUser("pi", group);
    const a = await makeAllocation(group, 100);
    await entry(a, "reserve", 100);
    await entry(a, "charge", 100);
    expect(await check(a)).toMatchObject({ use: 1, sent: 100 });
    expect(await check(a)).toMatchObject({ sent: null });
    expect(await mailsOf(a, "allocation.100")).toHaveLength(1);
    expect(await mailsOf(a, "allocation.80")).toHaveLength(0);
    const row = (await db().Allocation.findByPk(a.id))!;
    expect(row.alertedAt80).toBeInstanceOf(Date);
    expect(row.alertedAt100).toBeInstanceOf(Date);
    expect((await mailsOf(a, "allocation.100"))[0].textBody).toContain("Everything given is spent");
  });

  it("counts adjustments in what was given, and never divides by zero", () => {
    const base = { granted: 100, adjusted: -50, reserved: 40, charged: 40, released: 0, held: 0, available: 10 };
    expect(allocationUse(base)).toBeCloseTo(0.8, 12);
    expect(allocationUse({ ...base, granted: 0, adjusted: 0, charged: 0 })).toBe(0);
    expect(allocationUse({ ...base, granted: 0, adjusted: 0 })).toBe(Infinity);
  });

  it("fails an unknown allocation for good", async () => {
    await expect(checkAllocationJob.handle({ allocationId: "00000000-0000-4000-8000-000000000000" }, ctx)).rejects.toMatchObject({ name: "PermanentJobError" });
  });
});

describe("near-cap notice", () => {
  it("tells a person once when their use or holds pass 80 % of their cap, again only after dropping below", async () => {
    const group = await makeGroup();
    const coordinator = await makeUser("coordinator", group, { name: "Near Coordinator" });
    const ada = await makeUser("researcher", group, { name: "Ada" });
    const bo = await makeUser("researcher", group, { name: "Bo" });
    const a = await makeAllocation(group, 1_000);
    await setCap(sys, a.id, { subject: "everyone", coreHours: 10 });
    await entry(a, "reserve", 7.9, ada.id);
    await entry(a, "reserve", 3, bo.id);
    expect((await check(a)).notices).toEqual({ notified: [], rearmed: [] });
    await entry(a, "reserve", 0.1, ada.id); // 8 of 10: exactly 80 %
    expect((await check(a)).notices).toEqual({ notified: [ada.id], rearmed: [] });
    expect((await check(a)).notices).toEqual({ notified: [], rearmed: [] });
    await entry(a, "release", 2, ada.id); // 6 of 10
    expect((await check(a)).notices).toEqual({ notified: [], rearmed: [ada.id] });
    await entry(a, "reserve", 3, ada.id); // 9 of 10
    expect((await check(a)).notices.notified).toEqual([ada.id]);

    const notes = await mailsOf(a, "allocation.near-cap");
    expect(notes.map((n) => n.to)).toEqual([[ada.email], [ada.email]]);
    expect(notes[0].subject).toBe(`[Ergodex] You are near your cap on "${a.name}"`);
    expect(notes[0].textBody).toContain(`you have used or hold 8 of your 10 core-hour cap on allocation "${a.name}" (80 %; the cap for everyone: 10 core-hours)`);
    expect(notes[0].textBody).toContain(`Ask Near Coordinator <${coordinator.email}>`);
    expect(notes[1].textBody).toContain("9 of your 10 core-hour cap");
  });
});

describe("weekly coordinator digest", () => {
  it("lists each current allocation with charged share, period gone, burn rate, run-out and the week's top users; once per ISO week", async () => {
    const coordinator = await makeUser("coordinator");
    const group = await makeGroup({ name: "Digest Group" });
    const ada = await makeUser("researcher", group, { name: "Ada Digest" });
    const now = new Date();
    const day = 86_400_000;
    const a = await makeAllocation(group, 1_400, { name: "digest main", periodStart: new Date(now.getTime() - 100 * day), periodEnd: new Date(now.getTime() + 100 * day) });
    await makeAllocation(group, 10, { name: "digest past", periodStart: new Date(now.getTime() - 400 * day), periodEnd: new Date(now.getTime() - 35 * day) });
    const backdated = (kind: string, coreHours: number, daysAgo: number, userId: string | null) => db().sequelize.query(
      "INSERT INTO ledger_entries (allocation_id, kind, core_hours, user_id, created_at) VALUES ($1, $2, $3, $4, $5)",
      { type: QueryTypes.INSERT, bind: [a.id, kind, coreHours, userId, new Date(now.getTime() - daysAgo * day)] });
    await backdated("reserve", 700, 30, ada.id);
    await backdated("charge", 420, 30, ada.id); // outside the 14-day window
    await backdated("charge", 140, 10, ada.id); // inside the window, not the last week
    await backdated("charge", 70, 3, ada.id); // the last week
    const digest = (await allocationDigestText(now))!;
    // burn over the window: (140 + 70) core-hours over 14 days (+ today's elapsed part) ≈ 15/day → free 700 lasts ≈ 47 days (< 100 left)
    expect(digest.subject).toBe(`[Ergodex] Allocations digest ${isoWeek(now)}`);
    expect(digest.text).toContain("digest main — Digest Group");
    expect(digest.text).not.toContain("digest past");
    expect(digest.text).toContain("given 1,400, charged 630 (45 %), held 70, free 700 core-hours");
    expect(digest.text).toContain("period 50 % gone");
    expect(digest.text).toContain("even spending would be 7 core-hours/day");
    expect(digest.text).toMatch(/burn rate 1[45](\.\d)? core-hours\/day over the last 14 days; free hours run out on \d{4}-\d\d-\d\d — BEFORE the period ends/);
    expect(digest.text).toContain("last 7 days: 70 core-hours charged — Ada Digest 70");
    expect(digest.text).toMatch(/^Allocations this week \(\d{4}-W\d\d\): \d+ current, \d+ on course to run out before the period ends\./); // other tests' allocations are current too

    const first = await allocationDigestJob.handle({}, ctx) as { created: boolean; messageId: string };
    expect(first.created).toBe(true);
    const again = await allocationDigestJob.handle({}, ctx) as { created: boolean; messageId: string };
    expect(again).toEqual({ created: false, messageId: first.messageId });
    const mail = (await db().OutboxMessage.findByPk(first.messageId))!;
    expect(mail.to).toContain(coordinator.email);
    expect(mail.to).not.toContain(ada.email);
    expect(mail.kind).toBe("allocation.digest");
    expect(allocationDigestJob.schedule).toEqual({ cron: "0 7 * * 1", tz: "UTC" });
  });

  it("names ISO weeks as ISO 8601 does (the week with the year's first Thursday is week 1)", () => {
    expect(isoWeek(new Date("2026-12-02T12:00:00Z"))).toBe("2026-W49");
    expect(isoWeek(new Date("2027-01-01T00:00:00Z"))).toBe("2026-W53"); // a Friday: belongs to the last week of 2026
    expect(isoWeek(new Date("2021-01-04T00:00:00Z"))).toBe("2021-W01");
  });
});

// Allocation use alerts (80 % and 100 %, once each, to coordinators and the group's PIs) and
// cluster-fault alerts (to coordinators and admins, once per cluster per hour).
import { afterAll, describe, expect, it } from "vitest";
import { Op } from "sequelize";
import { makeAllocation, makeCluster, makeGroup, makeUser, useTestDatabase } from "../../support/db";
import { stopBoss } from "@/lib/queue/boss";
import { alertClusterFault } from "@/lib/mail/cluster-fault";
import { allocationUse } from "@/lib/mail/allocation-alerts";
import { checkAllocationJob } from "@/broker/jobs/check-allocation";
import type { Allocation } from "@/models";
import { db } from "@/models";

useTestDatabase();
const ctx = { jobId: "test", retryCount: 0, log: undefined as never };
afterAll(() => stopBoss({ graceful: false }));

const reserve = (allocation: Allocation, coreHours: number) => db().LedgerEntry.create({ allocationId: allocation.id, kind: "reserve", coreHours });
const check = (allocation: Allocation) => checkAllocationJob.handle({ allocationId: allocation.id }, ctx) as Promise<{ use: number; sent: 80 | 100 | null; messageId: string | null }>;
const alertMails = (allocation: Allocation) => db().OutboxMessage.findAll({ where: { dedupeKey: [`allocation:${allocation.id}:80`, `allocation:${allocation.id}:100`] }, order: [["id", "ASC"]] });

describe("allocation alerts", () => {
  it("mails at 80 % once and at 100 % once, to coordinators and the group's PIs only", async () => {
    const group = await makeGroup();
    const pi = await makeUser("pi", group);
    const researcher = await makeUser("researcher", group);
    const coordinator = await makeUser("coordinator");
    const retired = await makeUser("coordinator", null, { active: false });
    const otherPi = await makeUser("pi", await makeGroup());
    const allocation = await makeAllocation(group, 1_000);

    await reserve(allocation, 700);
    expect(await check(allocation)).toMatchObject({ use: 0.7, sent: null });

    await reserve(allocation, 150); // 850 of 1,000
    const at80 = await check(allocation);
    expect(at80).toMatchObject({ use: 0.85, sent: 80 });
    expect(await check(allocation)).toMatchObject({ sent: null }); // not twice

    // Charged hours count as used too: settle 850 as 800 charged + 50 released, then 210 more reserved.
    await db().LedgerEntry.bulkCreate([
      { allocationId: allocation.id, kind: "charge", coreHours: 800 },
      { allocationId: allocation.id, kind: "release", coreHours: 50 },
    ]);
    await reserve(allocation, 210); // (800 + 210) / 1,000
    const at100 = await check(allocation);
    expect(at100.sent).toBe(100);
    expect(at100.use).toBeCloseTo(1.01, 12);
    expect(await check(allocation)).toMatchObject({ sent: null });

    const mails = await alertMails(allocation);
    expect(mails.map((m) => m.kind)).toEqual(["allocation.80", "allocation.100"]);
    for (const m of mails) {
      expect(new Set(m.to)).toEqual(new Set([pi.email, coordinator.email]));
      expect(m.to).not.toContain(researcher.email);
      expect(m.to).not.toContain(retired.email);
      expect(m.to).not.toContain(otherPi.email);
    }
    expect(mails[0].subject).toBe(`[Ergodex] Allocation "${allocation.name}" at 80 % use`);
    expect(mails[0].textBody).toContain("85.0 % is spent or held by runs");
    expect(mails[1].textBody).toContain("101.0 % is spent or held by runs");
    expect(mails[1].textBody).toContain("Charged:   800 core-hours");
    const row = (await db().Allocation.findByPk(allocation.id))!;
    expect(row.alertedAt80).toBeInstanceOf(Date);
    expect(row.alertedAt100).toBeInstanceOf(Date);
  });

  it("sends only the 100 % e-mail when the first check finds it already full, and marks 80 % as covered", async () => {
    const group = await makeGroup();
    await makeUser("pi", group);
    const allocation = await makeAllocation(group, 100);
    await reserve(allocation, 100);
    expect(await check(allocation)).toMatchObject({ use: 1, sent: 100 });
    expect(await check(allocation)).toMatchObject({ sent: null });
    expect((await alertMails(allocation)).map((m) => m.kind)).toEqual(["allocation.100"]);
    expect((await db().Allocation.findByPk(allocation.id))!.alertedAt80).toBeInstanceOf(Date);
  });

  it("counts adjustments in what was given, and never divides by zero", () => {
    const base = { granted: 100, adjusted: -50, reserved: 40, charged: 0, released: 0, held: 40, available: 10 };
    expect(allocationUse(base)).toBeCloseTo(0.8, 12);
    expect(allocationUse({ ...base, granted: 0, adjusted: 0, held: 0 })).toBe(0);
    expect(allocationUse({ ...base, granted: 0, adjusted: 0 })).toBe(Infinity);
  });

  it("fails an unknown allocation for good", async () => {
    await expect(checkAllocationJob.handle({ allocationId: "00000000-0000-4000-8000-000000000000" }, ctx)).rejects.toMatchObject({ name: "PermanentJobError" });
  });
});

describe("cluster fault alerts", () => {
  it("mails coordinators and admins once per cluster per hour", async () => {
    const admin = await makeUser("admin");
    const coordinator = await makeUser("coordinator");
    const researcher = await makeUser("researcher");
    const cluster = await makeCluster();
    const other = await makeCluster();
    const at = new Date("2025-12-01T14:05:00Z");

    const first = await alertClusterFault(cluster.id, "host_key_mismatch", "expected SHA256:abc, got SHA256:xyz", { at });
    expect(first?.created).toBe(true);
    const again = await alertClusterFault(cluster.id, "unreachable", "ECONNREFUSED", { at: new Date("2025-12-01T14:55:00Z") });
    expect(again).toEqual({ id: first!.id, created: false });
    const nextHour = await alertClusterFault(cluster.id, "unreachable", "ECONNREFUSED", { at: new Date("2025-12-01T15:01:00Z") });
    expect(nextHour?.created).toBe(true);
    const otherCluster = await alertClusterFault(other.id, "unreachable", "timeout", { at });
    expect(otherCluster?.created).toBe(true);

    const mail = (await db().OutboxMessage.findByPk(first!.id))!;
    expect(mail.to).toContain(admin.email);
    expect(mail.to).toContain(coordinator.email);
    expect(mail.to).not.toContain(researcher.email);
    expect(mail.subject).toBe(`[Ergodex] Cluster "${cluster.name}": host key mismatch`);
    expect(mail.textBody).toContain("does not match the pinned fingerprint");
    expect(mail.textBody).toContain("expected SHA256:abc, got SHA256:xyz");
    expect(await db().OutboxMessage.count({ where: { kind: "cluster.fault" } })).toBe(3);
  });

  it("rolls back with the caller's transaction", async () => {
    await makeUser("admin");
    const cluster = await makeCluster();
    await expect(db().sequelize.transaction(async (transaction) => {
      await alertClusterFault(cluster.id, "unreachable", "x", { transaction });
      throw new Error("marking the cluster unhealthy failed");
    })).rejects.toThrow("unhealthy");
    expect(await db().OutboxMessage.count({ where: { dedupeKey: { [Op.like]: `cluster-fault:${cluster.id}:%` } } })).toBe(0);
    expect((await alertClusterFault(cluster.id, "unreachable", "x"))?.created).toBe(true); // the rolled-back alert does not block the next
  });
});

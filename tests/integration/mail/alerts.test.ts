// Cluster-fault alerts (to coordinators and admins, once per cluster per hour).
import { afterAll, describe, expect, it } from "vitest";
import { Op } from "sequelize";
import { makeCluster, makeUser, useTestDatabase } from "../../support/db";
import { stopBoss } from "@/lib/queue/boss";
import { alertClusterFault } from "@/lib/mail/cluster-fault";
import { db } from "@/models";

useTestDatabase();
afterAll(() => stopBoss({ graceful: false }));

// Allocation alerts (80 % / 100 %, near-cap, weekly digest): tests/integration/allocations/alerts.test.ts.

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

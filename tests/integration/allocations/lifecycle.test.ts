// The allocation lifecycle on the real database: grant, top up, adjust (reason required, never below
// free), reserve by submission, charge and release by settlement, suspend, resume, close. At every
// step the balance lib/allocations/balance.ts reports equals the entries summed here independently.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { allocationBalance } from "@/lib/allocations/balance";
import { changeBalance, grantAllocation, setAllocationState } from "@/lib/allocations/manage-allocations";
import { stateHistory, stateOf } from "@/lib/allocations/state";
import { submitEnsemble } from "@/lib/ensembles/submit-ensemble";
import { previewSubmission } from "@/lib/ensembles/preview-submission";
import { stopBoss } from "@/lib/queue/boss";
import { db } from "@/models";
import { makeCluster, makeGroup, useTestDatabase } from "../../support/db";
import { audit, isingSpec, jobs, person, registerSamplersAndCluster } from "../ensembles/fixture";
import { finishRun, ledgerSums, refusal } from "./support";

useTestDatabase();
beforeAll(registerSamplersAndCluster);
afterAll(() => stopBoss({ graceful: false }));

async function expectBalanceIsSum(allocationId: string) {
  const b = await allocationBalance(allocationId);
  const s = await ledgerSums(allocationId);
  expect({ available: b.available, charged: b.charged, held: b.held }).toEqual({ available: s.available, charged: s.charged, held: s.held });
  expect(s.lowest).toBeGreaterThanOrEqual(0); // policy: available never below zero, at any point of the ledger
  return b;
}

describe("allocation lifecycle", () => {
  it("grant → top up → adjust → reserve → charge/release → close, the balance the sum of entries throughout", async () => {
    const group = await makeGroup();
    const coord = await person("coordinator", null, { name: "Cora Ordinator" });
    const researcher = await person("researcher", group);
    const { id } = await grantAllocation(audit(coord.who), { groupId: group.id, name: "2026 main", periodStart: "2026-01-01", periodEnd: "2027-06-01", coreHours: 100 });
    expect(await expectBalanceIsSum(id)).toMatchObject({ granted: 100, available: 100 });

    expect((await changeBalance(audit(coord.who), id, { kind: "top-up", coreHours: 50 })).available).toBe(150);
    const noReason = await refusal(changeBalance(audit(coord.who), id, { kind: "adjust", coreHours: -20, reason: " " }));
    expect(noReason.details?.issues).toEqual([{ path: "/reason", message: "an adjustment needs a reason" }]);
    await changeBalance(audit(coord.who), id, { kind: "adjust", coreHours: -20, reason: "hours moved to the spring school" });
    expect(await expectBalanceIsSum(id)).toMatchObject({ granted: 150, adjusted: -20, available: 130 });

    // 6 runs × 1 core-hour reserved, then settled: 0.25 used, 1 used (failed), 0 used ×4 (cancelled: released in full)
    const sub = await submitEnsemble(audit(researcher.who), researcher.who, isingSpec());
    expect(await expectBalanceIsSum(id)).toMatchObject({ reserved: 6, held: 6, available: 124 });
    const tooMuch = await refusal(changeBalance(audit(coord.who), id, { kind: "adjust", coreHours: -125, reason: "take back more than is free" }));
    expect(tooMuch.code).toBe("conflict");
    expect(tooMuch.message).toContain("only 124 are free");
    expect((await ledgerSums(id)).count).toBe(4); // grant, top-up, adjust, reserve: the refused adjustment wrote nothing
    await finishRun(sub.runIds[0], 0.25);
    await finishRun(sub.runIds[1], 1, "failed");
    expect(await expectBalanceIsSum(id)).toMatchObject({ charged: 1.25, held: 4, available: 124.75 });

    await setAllocationState(audit(coord.who), id, { state: "closed", reason: "period over, report sent" });
    expect((await stateOf(id)).state).toBe("closed");
    const closed = await refusal(submitEnsemble(audit(researcher.who), researcher.who, isingSpec({ allocation: "2026 main" })));
    expect(closed.code).toBe("insufficient_allocation");
    expect(closed.details).toMatchObject({ limit: "closed", needed: 6, allocation: { id, state: "closed" }, contacts: [{ name: "Cora Ordinator", email: coord.user.email }] });
    expect(closed.message).toContain(`Ask Cora Ordinator <${coord.user.email}>`);
    expect((await refusal(changeBalance(audit(coord.who), id, { kind: "top-up", coreHours: 1 }))).code).toBe("conflict");
    expect((await refusal(setAllocationState(audit(coord.who), id, { state: "active", reason: "reopen" }))).code).toBe("conflict");
    // runs in flight still settle on a closed allocation
    for (const runId of sub.runIds.slice(2)) await finishRun(runId, 0);
    expect(await expectBalanceIsSum(id)).toMatchObject({ charged: 1.25, held: 0, available: 128.75 });

    const audits = await db().AuditEntry.findAll({ where: { targetId: id }, order: [["id", "ASC"]] });
    expect(audits.map((a) => a.action)).toEqual(["allocation.grant", "allocation.top-up", "allocation.adjust", "allocation.close"]);
    expect((await jobs("check-allocation")).some((j) => j.data.allocationId === id)).toBe(true);
  });

  it("a suspended allocation refuses submissions (preview, submit) saying so and whom to ask; resumed, it admits again", async () => {
    const group = await makeGroup();
    const coord = await person("coordinator", group, { name: "Greta Member-Coordinator" });
    await person("coordinator", null, { name: "Other Coordinator" }); // not a member and granted nothing: not listed
    const researcher = await person("researcher", group);
    const { id, name } = await grantAllocation(audit(coord.who), { groupId: group.id, name: "suspendable", periodStart: "2026-01-01", periodEnd: "2027-06-01", coreHours: 100 });
    await setAllocationState(audit(coord.who), id, { state: "suspended", reason: "usage report overdue" });
    const preview = await previewSubmission(researcher.who, isingSpec());
    expect(preview.ok).toBe(false);
    expect(preview.explanation).toMatchObject({ limit: "suspended", needed: 6, free: 0, contacts: [{ name: "Greta Member-Coordinator", email: coord.user.email }] });
    expect(preview.problems[0].message).toBe(`allocation "${name}" is suspended: it takes no new submissions until a coordinator resumes it. Ask Greta Member-Coordinator <${coord.user.email}>.`);
    const refused = await refusal(submitEnsemble(audit(researcher.who), researcher.who, isingSpec()));
    expect(refused.details).toMatchObject({ limit: "suspended", needed: 6, available: 0 });
    expect((await ledgerSums(id)).count).toBe(1);
    await setAllocationState(audit(coord.who), id, { state: "active", reason: "report received" });
    await expect(submitEnsemble(audit(researcher.who), researcher.who, isingSpec())).resolves.toMatchObject({ reservedCoreHours: 6 });
    expect((await stateHistory(id)).map((h) => [h.state, h.reason, h.actorName])).toEqual([
      ["suspended", "usage report overdue", "Greta Member-Coordinator"], ["active", "report received", "Greta Member-Coordinator"],
    ]);
    // the history is append-only in the database too
    await expect(db().sequelize.query("UPDATE allocation_state_changes SET reason = 'x' WHERE allocation_id = $1", { bind: [id] })).rejects.toThrow();
  });

  it("an allocation for one cluster refuses submissions that go to another", async () => {
    const group = await makeGroup();
    const coord = await person("coordinator", null);
    const researcher = await person("researcher", group);
    const elsewhere = await makeCluster({ active: false });
    const { id } = await grantAllocation(audit(coord.who), { groupId: group.id, name: "for elsewhere", periodStart: "2026-01-01", periodEnd: "2027-06-01", coreHours: 100, clusterId: elsewhere.id });
    const refused = await refusal(submitEnsemble(audit(researcher.who), researcher.who, isingSpec()));
    expect(refused.details).toMatchObject({ limit: "cluster", allocation: { id } });
    expect(refused.message).toContain("is for another cluster than the one this submission goes to");
  });

  it("an allocation granted on one active cluster places a spec that names none there, among several", async () => {
    const group = await makeGroup();
    const coord = await person("coordinator", null);
    const researcher = await person("researcher", group);
    const granted = await makeCluster(); // a second active cluster: without the allocation's, the spec would be ambiguous
    await grantAllocation(audit(coord.who), { groupId: group.id, name: "on granted", periodStart: "2026-01-01", periodEnd: "2027-06-01", coreHours: 100, clusterId: granted.id });
    expect(await db().Cluster.count({ where: { active: true } })).toBeGreaterThan(1);
    const { ensembleId } = await submitEnsemble(audit(researcher.who), researcher.who, isingSpec());
    expect((await db().Ensemble.findByPk(ensembleId))!.clusterId).toBe(granted.id);
  });

  it("refuses a grant with a bad period or group, naming the field", async () => {
    const coord = await person("coordinator", null);
    const group = await makeGroup();
    const bad = await refusal(grantAllocation(audit(coord.who), { groupId: group.id, name: "x", periodStart: "2026-05-01", periodEnd: "2026-04-01", coreHours: 1 }));
    expect(bad.details?.issues).toEqual([{ path: "/periodEnd", message: "must be after the start of the period" }]);
    const noGroup = await refusal(grantAllocation(audit(coord.who), { groupId: "00000000-0000-4000-8000-000000000000", name: "x", periodStart: "2026-01-01", periodEnd: "2027-01-01", coreHours: 1 }));
    expect(noGroup.details?.issues).toEqual([{ path: "/groupId", message: "no such group" }]);
    await grantAllocation(audit(coord.who), { groupId: group.id, name: "twice", periodStart: "2026-01-01", periodEnd: "2027-01-01", coreHours: 1 });
    const twice = await refusal(grantAllocation(audit(coord.who), { groupId: group.id, name: "twice", periodStart: "2026-01-01", periodEnd: "2027-01-01", coreHours: 1 }));
    expect(twice.details?.issues?.[0].path).toBe("/name");
  });
});

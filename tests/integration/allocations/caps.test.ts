// Caps inside an allocation: the default for everyone (absolute or a share of the grant), a person's
// own cap, the per-ensemble ceiling, the legacy perPersonCapCoreHours column; and a cap enforced
// under 20 concurrent submissions by two people (the allocation row lock serialises them).
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { allocationBalance, usageByPerson } from "@/lib/allocations/balance";
import { grantAllocation, setCap } from "@/lib/allocations/manage-allocations";
import { submitEnsemble } from "@/lib/ensembles/submit-ensemble";
import { previewSubmission } from "@/lib/ensembles/preview-submission";
import { AppError } from "@/lib/errors";
import { stopBoss } from "@/lib/queue/boss";
import { makeAllocation, makeGroup, useTestDatabase } from "../../support/db";
import { audit, isingSpec, person, registerSamplersAndCluster } from "../ensembles/fixture";
import { ledgerSums, refusal } from "./support";

useTestDatabase();
beforeAll(registerSamplersAndCluster);
afterAll(() => stopBoss({ graceful: false }));

// isingSpec(): 6 runs × 2 cores × 30 min = 6 core-hours per submission
async function setup(grant: number) {
  const group = await makeGroup();
  const coord = await person("coordinator", null, { name: "Cap Coordinator" });
  const a = await person("researcher", group, { name: "Ada Researcher" });
  const b = await person("researcher", group, { name: "Bo Researcher" });
  const { id } = await grantAllocation(audit(coord.who), { groupId: group.id, name: `capped ${group.slug}`, periodStart: "2026-01-01", periodEnd: "2027-06-01", coreHours: grant });
  return { group, coord, a, b, id };
}

describe("caps", () => {
  it("a share of the grant for everyone, a person's own cap above it, and the warning before the refusal", async () => {
    const { coord, a, b, id } = await setup(100);
    await setCap(audit(coord.who), id, { subject: "everyone", share: 0.1, reason: "ten percent each" }); // 10 core-hours
    await setCap(audit(coord.who), id, { subject: "person", userId: b.user.id, coreHours: 20, reason: "thesis runs" });

    const first = await previewSubmission(a.who, isingSpec());
    expect(first.ok).toBe(true);
    expect(first.cap).toMatchObject({ limit: 10, used: 0, remaining: 10, rule: "the cap for everyone: 10 % of the grant" });
    // 6 of 10 is below 80 %: no warning; 6 + 6 would pass the cap
    expect(first.warnings).toEqual([]);
    await submitEnsemble(audit(a.who), a.who, isingSpec());
    const second = await previewSubmission(a.who, isingSpec());
    expect(second.explanation).toMatchObject({ limit: "person_cap", needed: 6, free: 4 });
    expect(second.problems[0].message).toContain("needs 6 core-hours, 4 left of your per-person cap of 10");
    expect(second.problems[0].message).toContain(`Ask Cap Coordinator <${coord.user.email}>`);

    await submitEnsemble(audit(b.who), b.who, isingSpec());
    const bNext = await previewSubmission(b.who, isingSpec()); // 12 of 20 = 60 %: fine; the one after (18) warns
    expect(bNext).toMatchObject({ ok: true, warnings: [] });
    await submitEnsemble(audit(b.who), b.who, isingSpec());
    const bNear = await previewSubmission(b.who, isingSpec({ resources: { cores: 1, wallMinutes: 30 } })); // +3 → 15 of 20 = 75 %: no warning
    expect(bNear.warnings).toEqual([]);
    const bWarn = await previewSubmission(b.who, isingSpec({ temps: [2.2, 2.3] })); // +4 → 16 of 20 = 80 %: warned, admitted
    expect(bWarn.ok).toBe(true);
    expect(bWarn.warnings[0]).toMatch(/^after this submission you will have used or held 16 of your 20 core-hour cap .* \(80 %\)/);

    // raising the share raises the default; lifting the person's cap falls back to it
    await setCap(audit(coord.who), id, { subject: "everyone", share: 0.5 });
    await setCap(audit(coord.who), id, { subject: "person", userId: b.user.id });
    expect((await previewSubmission(b.who, isingSpec())).cap).toMatchObject({ limit: 50, used: 12 });
  });

  it("the per-ensemble ceiling refuses one large submission but not smaller ones; a share follows top-ups", async () => {
    const { coord, a, id } = await setup(200);
    await setCap(audit(coord.who), id, { subject: "ensemble", coreHours: 5 });
    const refused = await refusal(submitEnsemble(audit(a.who), a.who, isingSpec()));
    expect(refused.details).toMatchObject({ limit: "ensemble_ceiling", needed: 6, available: 5, ceiling: { limit: 5 } });
    expect(refused.message).toContain("split the scan into smaller ensembles");
    await expect(submitEnsemble(audit(a.who), a.who, isingSpec({ temps: [2.2, 2.3] }))).resolves.toMatchObject({ reservedCoreHours: 4 });
    await setCap(audit(coord.who), id, { subject: "ensemble", share: 0.03 }); // 3 % of 200 = 6
    await expect(submitEnsemble(audit(a.who), a.who, isingSpec())).resolves.toMatchObject({ reservedCoreHours: 6 });
  });

  it("the legacy perPersonCapCoreHours column still caps, until a cap for everyone replaces it", async () => {
    const group = await makeGroup();
    const coord = await person("coordinator", null);
    const r = await person("researcher", group);
    const allocation = await makeAllocation(group, 1000, { perPersonCapCoreHours: 8 });
    await submitEnsemble(audit(r.who), r.who, isingSpec());
    expect((await refusal(submitEnsemble(audit(r.who), r.who, isingSpec()))).details).toMatchObject({ limit: "person_cap", cap: { limit: 8, used: 6, remaining: 2 } });
    await setCap(audit(coord.who), allocation.id, { subject: "everyone", coreHours: 12 });
    await expect(submitEnsemble(audit(r.who), r.who, isingSpec())).resolves.toMatchObject({ reservedCoreHours: 6 });
  });

  it("refuses caps that name the wrong subject or an outsider", async () => {
    const { coord, id } = await setup(10);
    const outsider = await person("researcher", await makeGroup());
    expect((await refusal(setCap(audit(coord.who), id, { subject: "person", userId: outsider.user.id, coreHours: 1 }))).details?.issues?.[0]).toEqual({ path: "/userId", message: "is not a member of the allocation's group" });
    expect((await refusal(setCap(audit(coord.who), id, { subject: "person", coreHours: 1 }))).details?.issues?.[0].path).toBe("/userId");
    expect((await refusal(setCap(audit(coord.who), id, { subject: "everyone", coreHours: 1, share: 0.5 }))).details?.issues?.[0].path).toBe("/share");
  });
});

describe("a cap under concurrency", () => {
  it("20 submissions at once by two people: Ada (cap 15) gets exactly 2, Bo (own cap 25) exactly 4", async () => {
    const { coord, a, b, id } = await setup(1000);
    await setCap(audit(coord.who), id, { subject: "everyone", coreHours: 15 });
    await setCap(audit(coord.who), id, { subject: "person", userId: b.user.id, coreHours: 25 });
    const attempts = Array.from({ length: 20 }, (_, i) => (i % 2 === 0 ? a : b));
    const results = await Promise.allSettled(attempts.map((p) => submitEnsemble(audit(p.who), p.who, isingSpec())));
    const admitted = { a: 0, b: 0 };
    const limits: string[] = [];
    results.forEach((r, i) => {
      const who = attempts[i] === a ? "a" : "b";
      if (r.status === "fulfilled") admitted[who]++;
      else {
        expect(r.reason).toBeInstanceOf(AppError);
        limits.push(String((r.reason as AppError).details?.limit));
      }
    });
    expect(admitted).toEqual({ a: 2, b: 4 });
    expect(limits).toEqual(Array(14).fill("person_cap"));
    const usage = await usageByPerson(id);
    expect(usage.get(a.user.id)?.used).toBe(12);
    expect(usage.get(b.user.id)?.used).toBe(24);
    expect((await allocationBalance(id)).available).toBe(1000 - 36);
    expect((await ledgerSums(id)).lowest).toBeGreaterThanOrEqual(0);
  });
});

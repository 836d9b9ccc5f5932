// Submission: one transaction creates points, runs, seeds, the reserve entry, events, audit and the dispatch job;
// overspending the allocation or the per-person cap is refused with the numbers and writes nothing.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { AppError } from "@/lib/errors";
import { allocationBalance } from "@/lib/allocations/balance";
import { stopBoss } from "@/lib/queue/boss";
import { submitEnsemble } from "@/lib/ensembles/submit-ensemble";
import { previewSubmission } from "@/lib/ensembles/preview-submission";
import { expandSpec, specHash } from "@/lib/spec";
import { makeAllocation, makeGroup, useTestDatabase } from "../../support/db";
import { audit, counts, isingSpec, jobs, person, registerSamplersAndCluster } from "./fixture";

const t = useTestDatabase();
beforeAll(registerSamplersAndCluster);
afterAll(() => stopBoss({ graceful: false }));

async function refusal(p: Promise<unknown>): Promise<AppError> {
  const err = await p.then(() => null, (e: unknown) => e);
  expect(err).toBeInstanceOf(AppError);
  return err as AppError;
}

describe("submitEnsemble", () => {
  it("creates 3 points × 2 replicas with derived seeds, reserves cores × wall time, records events, audit and a dispatch job", async () => {
    const group = await makeGroup();
    const allocation = await makeAllocation(group, 1000);
    const { who } = await person("researcher", group);
    const spec = isingSpec();
    const before = await counts();
    const out = await submitEnsemble(audit(who), who, spec);

    expect(out.runIds).toHaveLength(6);
    // 2 cores × 30 min = 1 core-hour per run, 6 runs
    expect(out.reservedCoreHours).toBe(6);
    const m = t.models;
    const e = (await m.Ensemble.findByPk(out.ensembleId))!;
    expect(e).toMatchObject({ ownerId: who.userId, groupId: group.id, allocationId: allocation.id, masterSeed: "987654321", reservedCoreHours: 6, state: "active" });
    expect(e.specHash).toBe(specHash(spec));
    expect(e.tags).toEqual(["near-tc", "L8"]);
    const points = await m.ParameterPoint.findAll({ where: { ensembleId: e.id }, order: [["pointIndex", "ASC"]] });
    expect(points.map((p) => p.params)).toEqual([2.2, 2.3, 2.4].map((T) => ({ L: 8, algorithm: "metropolis", T })));
    const runs = await m.Run.findAll({ where: { ensembleId: e.id } });
    const expected = expandSpec(spec).runs;
    const got = runs.map((r) => ({ pointIndex: points.find((p) => p.id === r.pointId)!.pointIndex, replica: r.replica, seed: r.seed }));
    expect(got.sort((a, b) => a.pointIndex - b.pointIndex || a.replica - b.replica)).toEqual(expected);
    expect(new Set(runs.map((r) => r.seed)).size).toBe(6);
    for (const r of runs) expect(r).toMatchObject({ state: "queued", cores: 2, reservedCoreHours: 1, attempt: 1, sweepsTotal: 250 });

    const ledger = await m.LedgerEntry.findAll({ where: { ensembleId: e.id } });
    expect(ledger.map((l) => ({ kind: l.kind, coreHours: l.coreHours, userId: l.userId, allocationId: l.allocationId })))
      .toEqual([{ kind: "reserve", coreHours: 6, userId: who.userId, allocationId: allocation.id }]);
    expect((await allocationBalance(allocation.id)).available).toBe(994);
    const events = await m.RunEvent.findAll({ where: { runId: out.runIds } });
    expect(events.map((ev) => [ev.fromState, ev.toState, ev.cause, ev.actorId])).toEqual(Array(6).fill([null, "queued", "user.submit", who.userId]));
    const auditRow = await m.AuditEntry.findOne({ where: { action: "ensemble.submit", targetId: e.id } });
    expect(auditRow).toMatchObject({ actorId: who.userId, groupId: group.id, targetType: "ensemble" });
    expect(auditRow!.detail).toMatchObject({ points: 3, runs: 6, reservedCoreHours: 6 });
    expect((await jobs("dispatch-runs")).filter((j) => j.data.ensembleId === e.id)).toEqual([{ data: { ensembleId: e.id }, state: "created" }]);
    const after = await counts();
    expect({ ...after, ensembles: after.ensembles - before.ensembles, points: after.points - before.points, runs: after.runs - before.runs })
      .toMatchObject({ ensembles: 1, points: 3, runs: 6 });
  });

  it("the preview shows the same runs, seeds and core-hours without writing anything", async () => {
    const group = await makeGroup();
    const allocation = await makeAllocation(group, 100);
    const { who } = await person("researcher", group);
    const before = await counts();
    const p = await previewSubmission(who, isingSpec({ replicas: 3 }));
    expect(p).toMatchObject({ points: 3, runs: 9, coreHoursPerRun: 1, coreHoursNeeded: 9, ok: true, problems: [],
      allocation: { id: allocation.id, available: 100 } });
    expect(p.seeds.map((s) => s.seed)).toEqual(expandSpec(isingSpec({ replicas: 3 })).runs.map((r) => r.seed));
    expect(await counts()).toEqual(before);
    const over = await previewSubmission(who, isingSpec({ replicas: 100, temps: [2.0, 2.1] }));
    expect(over.ok).toBe(false);
    // who to ask is part of every refusal (#8); this test database has no coordinator
    expect(over.problems[0].message).toBe('needs 200 core-hours, 100 available on allocation "' + allocation.name + '". Ask an admin: no coordinator is registered.');
  });

  it("refuses an overspend with needed and available, and writes nothing (no rows, no job)", async () => {
    const group = await makeGroup();
    const allocation = await makeAllocation(group, 10);
    const { who } = await person("researcher", group);
    const before = await counts();
    const err = await refusal(submitEnsemble(audit(who), who, isingSpec({ replicas: 4 })));
    expect(err.code).toBe("insufficient_allocation");
    expect(err.status).toBe(409);
    expect(err.details).toMatchObject({ needed: 12, available: 10 });
    expect(err.message).toMatch(/needs 12 core-hours, 10 available/);
    expect(await counts()).toEqual(before);
    expect((await allocationBalance(allocation.id)).available).toBe(10);
  });

  it("applies the per-person cap on top of the balance, per person", async () => {
    const group = await makeGroup();
    const allocation = await makeAllocation(group, 1000, { perPersonCapCoreHours: 8 });
    const a = await person("researcher", group);
    const b = await person("researcher", group);
    await submitEnsemble(audit(a.who), a.who, isingSpec());
    const err = await refusal(submitEnsemble(audit(a.who), a.who, isingSpec()));
    expect(err.code).toBe("insufficient_allocation");
    expect(err.details).toMatchObject({ needed: 6, available: 2, cap: { limit: 8, used: 6, remaining: 2 } });
    expect(err.message).toMatch(/per-person cap of 8/);
    await expect(submitEnsemble(audit(b.who), b.who, isingSpec())).resolves.toMatchObject({ reservedCoreHours: 6 });
    expect((await allocationBalance(allocation.id)).available).toBe(988);
  });

  it("names the field when the allocation or cluster cannot be found, and refuses viewers and outsiders", async () => {
    const group = await makeGroup();
    await makeAllocation(group, 100);
    const { who } = await person("researcher", group);
    const issuesOf = async (p: Promise<unknown>) => (await refusal(p)).details?.issues;
    expect(await issuesOf(submitEnsemble(audit(who), who, isingSpec({ allocation: "no such" })))).toEqual([{ path: "/allocation", message: 'no allocation named "no such" in your groups' }]);
    expect(await issuesOf(submitEnsemble(audit(who), who, isingSpec({ cluster: "no-such" })))).toEqual([{ path: "/cluster", message: 'no cluster named "no-such"' }]);
    const lonely = await person("researcher", await makeGroup());
    expect((await issuesOf(submitEnsemble(audit(lonely.who), lonely.who, isingSpec())))![0].path).toBe("/allocation");
    const other = await makeGroup();
    const otherAlloc = await makeAllocation(other, 100);
    expect((await issuesOf(submitEnsemble(audit(who), who, isingSpec({ allocation: otherAlloc.name }))))![0].path).toBe("/allocation");
    const viewer = await person("viewer", group);
    expect((await refusal(submitEnsemble(audit(viewer.who), viewer.who, isingSpec()))).code).toBe("forbidden");
    const admin = await person("admin", null);
    await expect(submitEnsemble(audit(admin.who), admin.who, isingSpec({ allocation: otherAlloc.name }))).resolves.toMatchObject({ reservedCoreHours: 6 });
  });
});

describe("concurrent submissions", () => {
  it("20 at once against room for exactly 5: exactly 5 accepted, the balance never below zero", async () => {
    const group = await makeGroup();
    const allocation = await makeAllocation(group, 30); // each submission reserves 6
    const { who } = await person("researcher", group);
    const results = await Promise.allSettled(Array.from({ length: 20 }, () => submitEnsemble(audit(who), who, isingSpec())));
    const ok = results.filter((r) => r.status === "fulfilled");
    const refused = results.filter((r): r is PromiseRejectedResult => r.status === "rejected");
    expect(ok).toHaveLength(5);
    expect(refused.map((r) => [(r.reason as AppError).code, (r.reason as AppError).details?.needed])).toEqual(Array(15).fill(["insufficient_allocation", 6]));
    expect((await allocationBalance(allocation.id)).available).toBe(0);
    // the running balance in ledger order (the lock serialises reservations) never dips below zero
    const entries = await t.models.LedgerEntry.findAll({ where: { allocationId: allocation.id }, order: [["id", "ASC"]] });
    let running = 0;
    const lows: number[] = [];
    for (const e of entries) { running += e.kind === "reserve" ? -e.coreHours : e.coreHours; lows.push(running); }
    expect(Math.min(...lows)).toBeGreaterThanOrEqual(0);
    expect(await t.models.Ensemble.count({ where: { allocationId: allocation.id } })).toBe(5);
  });
});

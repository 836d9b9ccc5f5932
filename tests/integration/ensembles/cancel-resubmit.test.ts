// Cancel (queued runs end at once and are released; runs on the cluster go to the broker's cancel-runs job)
// and resubmission of failed runs (a new reservation under the lock), plus the list, detail and estimates reads.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { AppError } from "@/lib/errors";
import { allocationBalance } from "@/lib/allocations/balance";
import { settleRun } from "@/lib/allocations/settle-run";
import { stopBoss } from "@/lib/queue/boss";
import { transitionRun } from "@/lib/runs/transition-run";
import { submitEnsemble } from "@/lib/ensembles/submit-ensemble";
import { cancelEnsemble } from "@/lib/ensembles/cancel-ensemble";
import { resubmitFailed } from "@/lib/ensembles/resubmit-failed";
import { listEnsembles } from "@/lib/ensembles/list-ensembles";
import { ensembleDetail } from "@/lib/ensembles/ensemble-detail";
import { ensembleEstimates, estimatesCsv } from "@/lib/ensembles/ensemble-estimates";
import { makeAllocation, makeGroup, useTestDatabase } from "../../support/db";
import { audit, isingSpec, jobs, person, registerSamplersAndCluster } from "./fixture";

const t = useTestDatabase();
beforeAll(registerSamplersAndCluster);
afterAll(() => stopBoss({ graceful: false }));

const codeOf = (p: Promise<unknown>) => p.then(() => "resolved", (e: AppError) => e.code);

describe("cancelEnsemble", () => {
  it("cancels queued runs at once (released), hands dispatched/running ones to a cancel-runs job, leaves failed ones", async () => {
    const group = await makeGroup();
    const allocation = await makeAllocation(group, 100);
    const { who } = await person("researcher", group);
    const { ensembleId, runIds } = await submitEnsemble(audit(who), who, isingSpec()); // 6 runs × 1 core-hour
    await transitionRun(runIds[0], "dispatched", { cause: "test.dispatch", patch: { dispatchToken: crypto.randomUUID() } });
    await transitionRun(runIds[1], "dispatched", { cause: "test.dispatch", patch: { dispatchToken: crypto.randomUUID() } });
    await transitionRun(runIds[1], "running", { cause: "test.poll" });
    await transitionRun(runIds[2], "failed", { cause: "test.fail", patch: { failureReason: "nonzero_exit", exitCode: 3 } });
    await settleRun(runIds[2]);

    const out = await cancelEnsemble(audit(who), who, ensembleId);
    expect(out).toMatchObject({ cancelled: 3, onCluster: 2, releasedCoreHours: 3, cancelJobQueued: true });
    const runs = await t.models.Run.findAll({ where: { id: runIds } });
    const stateOf = (id: string) => runs.find((r) => r.id === id)!;
    expect([0, 1, 2, 3, 4, 5].map((i) => stateOf(runIds[i]).state)).toEqual(["dispatched", "running", "failed", "cancelled", "cancelled", "cancelled"]);
    expect(stateOf(runIds[3]).failureReason).toBe("cancelled_by_user");
    const ev = await t.models.RunEvent.findOne({ where: { runId: runIds[4], toState: "cancelled" } });
    expect(ev).toMatchObject({ fromState: "queued", cause: "user.cancel", actorId: who.userId });
    // 3 cancelled runs + the failed one released; the 2 on the cluster still hold their 1 core-hour each
    expect((await allocationBalance(allocation.id)).held).toBe(2);
    expect((await allocationBalance(allocation.id)).available).toBe(98);
    expect((await jobs("cancel-runs")).filter((j) => j.data.ensembleId === ensembleId)).toHaveLength(1);
    expect((await t.models.Ensemble.findByPk(ensembleId))!.state).toBe("cancelled");
    expect(await t.models.AuditEntry.count({ where: { action: "ensemble.cancel", targetId: ensembleId } })).toBe(1);
  });

  it("with only queued runs it ends the ensemble without a broker job; a second cancel has nothing to do", async () => {
    const group = await makeGroup();
    const allocation = await makeAllocation(group, 100);
    const { who } = await person("researcher", group);
    const { ensembleId } = await submitEnsemble(audit(who), who, isingSpec());
    const jobsBefore = (await jobs("cancel-runs").catch(() => [])).length;
    expect(await cancelEnsemble(audit(who), who, ensembleId)).toMatchObject({ cancelled: 6, onCluster: 0, releasedCoreHours: 6, cancelJobQueued: false });
    expect((await allocationBalance(allocation.id))).toMatchObject({ available: 100, held: 0 });
    expect((await jobs("cancel-runs").catch(() => [])).length).toBe(jobsBefore);
    expect((await t.models.Ensemble.findByPk(ensembleId))!.finishedAt).not.toBeNull();
    expect(await codeOf(cancelEnsemble(audit(who), who, ensembleId))).toBe("conflict");
  });

  it("a queued run that already carries a dispatch token (a dispatch in flight) also gets a cancel-runs job", async () => {
    const group = await makeGroup();
    await makeAllocation(group, 100);
    const { who } = await person("researcher", group);
    const { ensembleId, runIds } = await submitEnsemble(audit(who), who, isingSpec({ temps: [2.2], replicas: 1 }));
    await t.models.Run.update({ dispatchToken: crypto.randomUUID() }, { where: { id: runIds[0] } });
    expect(await cancelEnsemble(audit(who), who, ensembleId)).toMatchObject({ cancelled: 1, onCluster: 0, cancelJobQueued: true });
    expect((await jobs("cancel-runs")).filter((j) => j.data.ensembleId === ensembleId)).toHaveLength(1);
  });

  it("only the owner, a PI leading the group or an admin may cancel; outsiders are told it does not exist", async () => {
    const group = await makeGroup();
    await makeAllocation(group, 100);
    const owner = await person("researcher", group);
    const { ensembleId } = await submitEnsemble(audit(owner.who), owner.who, isingSpec());
    const colleague = await person("researcher", group);
    const outsider = await person("researcher", await makeGroup());
    expect(await codeOf(cancelEnsemble(audit(colleague.who), colleague.who, ensembleId))).toBe("forbidden");
    expect(await codeOf(cancelEnsemble(audit(outsider.who), outsider.who, ensembleId))).toBe("not_found");
    const pi = await person("pi", group);
    expect(await codeOf(cancelEnsemble(audit(pi.who), pi.who, ensembleId))).toBe("resolved");
  });
});

describe("resubmitFailed", () => {
  it("queues failed runs again (attempt 2) with a per-run reservation, refused when the allocation cannot cover it", async () => {
    const group = await makeGroup();
    const allocation = await makeAllocation(group, 7);
    const { who } = await person("researcher", group);
    const { ensembleId, runIds } = await submitEnsemble(audit(who), who, isingSpec()); // holds 6 of 7
    for (const id of runIds.slice(0, 2)) {
      await transitionRun(id, "failed", { cause: "test.fail", patch: { failureReason: "node_lost" } });
      await settleRun(id); // releases 1 each: 3 available
    }
    expect((await allocationBalance(allocation.id)).available).toBe(3);
    const dispatchJobs = (await jobs("dispatch-runs")).filter((j) => j.data.ensembleId === ensembleId).length;
    const out = await resubmitFailed(audit(who), who, ensembleId);
    expect(out.runIds.sort()).toEqual(runIds.slice(0, 2).sort());
    expect(out.reservedCoreHours).toBe(2);
    const runs = await t.models.Run.findAll({ where: { id: out.runIds } });
    for (const r of runs) expect(r).toMatchObject({ state: "queued", attempt: 2, failureReason: null });
    const reserves = await t.models.LedgerEntry.findAll({ where: { ensembleId, kind: "reserve" }, order: [["id", "ASC"]] });
    expect(reserves.map((e) => [e.coreHours, e.runId])).toEqual([[6, null], ...out.runIds.map((id) => [1, id]).sort((a, b) => String(a[1]).localeCompare(String(b[1])))]);
    expect((await allocationBalance(allocation.id)).available).toBe(1);
    expect((await jobs("dispatch-runs")).filter((j) => j.data.ensembleId === ensembleId).length).toBe(dispatchJobs + 1);

    // three failures now need 3 core-hours with 1 available (plus the settled ones' 1 each = 3): fail a third and settle everything
    for (const id of runIds.slice(0, 3)) {
      if (id !== runIds[2]) await transitionRun(id, "dispatched", { cause: "test" });
      await transitionRun(id, "failed", { cause: "test.fail", patch: { failureReason: "nonzero_exit" } });
    }
    const before = await t.models.LedgerEntry.count();
    // nothing released yet for the new failures: 1 available, 3 needed
    const err = await resubmitFailed(audit(who), who, ensembleId).catch((e: AppError) => e);
    expect(err).toBeInstanceOf(AppError);
    expect((err as AppError).details).toMatchObject({ needed: 3, available: 1 });
    expect(await t.models.LedgerEntry.count()).toBe(before);
    expect(await t.models.Run.count({ where: { ensembleId, state: "failed" } })).toBe(3);
  });

  it("an ensemble without failed runs has nothing to resubmit", async () => {
    const group = await makeGroup();
    await makeAllocation(group, 100);
    const { who } = await person("researcher", group);
    const { ensembleId } = await submitEnsemble(audit(who), who, isingSpec());
    expect(await codeOf(resubmitFailed(audit(who), who, ensembleId))).toBe("conflict");
  });
});

describe("reads", () => {
  it("list: scoped to the caller's groups, filtered by state, sampler, owner and tag, sorted, paginated", async () => {
    const group = await makeGroup();
    await makeAllocation(group, 1000);
    const a = await person("researcher", group);
    const b = await person("researcher", group);
    const mk = async (who: typeof a.who, name: string, tags: string[]) => (await submitEnsemble(audit(who), who, isingSpec({ name, tags }))).ensembleId;
    const e1 = await mk(a.who, "alpha", ["x"]);
    const e2 = await mk(a.who, "bravo", ["y"]);
    const e3 = await mk(b.who, "charlie", ["x", "y"]);
    await cancelEnsemble(audit(a.who), a.who, e2);
    const outsider = await person("researcher", await makeGroup());
    expect((await listEnsembles(outsider.who)).total).toBe(0);
    const all = await listEnsembles(a.who, { sort: "name", order: "asc" });
    expect(all.data.map((r) => r.name)).toEqual(["alpha", "bravo", "charlie"]);
    expect(all.data[0]).toMatchObject({ id: e1, state: "active", sampler: { name: "ising2d" }, runs: { total: 6, queued: 6 }, reservedCoreHours: 6 });
    expect(all.data[1].runs).toMatchObject({ total: 6, cancelled: 6, queued: 0 });
    expect((await listEnsembles(a.who, { state: "cancelled" })).data.map((r) => r.id)).toEqual([e2]);
    expect((await listEnsembles(a.who, { owner: "me", sort: "name", order: "desc" })).data.map((r) => r.id)).toEqual([e2, e1]);
    expect((await listEnsembles(a.who, { tag: "x", sort: "name" })).data.map((r) => r.id).sort()).toEqual([e1, e3].sort());
    expect((await listEnsembles(a.who, { sampler: "loggas" })).total).toBe(0);
    const page2 = await listEnsembles(a.who, { sort: "name", order: "asc", page: 2, pageSize: 2 });
    expect(page2).toMatchObject({ total: 3, page: 2, pageSize: 2 });
    expect(page2.data.map((r) => r.name)).toEqual(["charlie"]);
  });

  it("detail: counts per state, core-hours from the ledger, a points × replicas grid; estimates as rows and CSV", async () => {
    const group = await makeGroup();
    await makeAllocation(group, 100);
    const { who } = await person("researcher", group);
    const { ensembleId, runIds } = await submitEnsemble(audit(who), who, isingSpec());
    await transitionRun(runIds[0], "failed", { cause: "test", patch: { failureReason: "nonzero_exit" } });
    await settleRun(runIds[0]);
    const d = await ensembleDetail(ensembleId);
    expect(d.counts).toMatchObject({ total: 6, queued: 5, failed: 1 });
    expect(d.coreHours).toEqual({ reserved: 6, charged: 0, released: 1, held: 5 });
    expect(d.points.map((p) => [p.index, p.params.T, p.runs.map((r) => r.replica)])).toEqual([[0, 2.2, [0, 1]], [1, 2.3, [0, 1]], [2, 2.4, [0, 1]]]);
    const point = await t.models.ParameterPoint.findOne({ where: { ensembleId, pointIndex: 1 } });
    await t.models.Estimate.create({ scope: "point", runId: null, pointId: point!.id, ensembleId, observable: "e", mean: -1.2223456789012345, error: 0.0014,
      tauInt: 3.5, tauIntError: 0.2, n: 400, method: "gamma", analysisVersion: "test", params: point!.params });
    const rows = await ensembleEstimates(ensembleId);
    expect(rows).toHaveLength(1);
    expect(rows[0]).toMatchObject({ pointIndex: 1, observable: "e", mean: -1.2223456789012345, tauInt: 3.5, params: { T: 2.3 } });
    const csv = estimatesCsv(rows).split("\r\n");
    expect(csv[0]).toBe("point,L,T,algorithm,run_id,replica,seed,observable,mean,error,tau_int,tau_int_error,n,therm_cut,window,method,analysis_version,chi2dof,flagged");
    expect(csv[1]).toBe(`1,8,2.3,metropolis,,,,e,${String(rows[0].mean)},0.0014,3.5,0.2,400,0,,gamma,test,,false`);
    // full precision: the cell reads back as the very double that was stored
    expect(Number(csv[1].split(",")[8])).toBe(-1.2223456789012345);
  });
});

// settleRun and the retry policy against the real ledger: charge what the attempts used (capped at
// the reservation), release the rest, once; failRun retries exactly what the spec allows.
import { afterAll, describe, expect, it } from "vitest";
import { useTestDatabase, makeAllocation, makeEnsemble, makeGroup, makeUser } from "@/tests/support/db";
import { settleRun } from "@/lib/allocations/settle-run";
import { failRun } from "@/lib/runs/fail-run";
import { transitionRun } from "@/lib/runs/transition-run";
import { retryPolicyOf, shouldRetry } from "@/lib/runs/retry-policy";
import { stopBoss } from "@/lib/queue/boss";
import { db } from "@/models";

const t = useTestDatabase();
afterAll(() => stopBoss({ graceful: false }));

async function fixture(reserve: number, spec: Record<string, unknown> = {}) {
  const group = await makeGroup();
  const owner = await makeUser("researcher", group);
  const allocation = await makeAllocation(group, 100);
  const f = await makeEnsemble({ owner, group, allocation, points: [{ L: 8, T: 2.3 }], replicas: 2, reserveCoreHours: reserve, cluster: null });
  if (Object.keys(spec).length) await f.ensemble.update({ spec: { ...f.ensemble.spec, ...spec } });
  return { ...f, owner, allocation };
}

const entries = (runId: string) => db().LedgerEntry.findAll({ where: { runId }, order: [["id", "ASC"]] });

describe("settleRun", () => {
  it("charges the attempts' core-hours, releases the rest, and is a no-op the second time", async () => {
    const { runs, owner, ensemble } = await fixture(2); // 1 core-hour per run
    const run = runs[0];
    await transitionRun(run.id, "dispatched", { cause: "test" });
    await transitionRun(run.id, "running", { cause: "test" });
    await transitionRun(run.id, "collecting", { cause: "test", detail: { coreHours: 0.25 } });
    await transitionRun(run.id, "done", { cause: "test" });
    const first = await settleRun(run.id);
    expect(first).toMatchObject({ charged: 0.25, released: 0.75, alreadySettled: false });
    const again = await settleRun(run.id);
    expect(again).toMatchObject({ charged: 0, released: 0, alreadySettled: true });
    const rows = await entries(run.id);
    expect(rows.map((e) => [e.kind, e.coreHours, e.ensembleId, e.userId])).toEqual([
      ["charge", 0.25, ensemble.id, owner.id], ["release", 0.75, ensemble.id, owner.id],
    ]);
  });

  it("caps the charge at the reservation and counts every attempt", async () => {
    const { runs } = await fixture(2);
    const run = runs[1];
    await transitionRun(run.id, "dispatched", { cause: "test" });
    await transitionRun(run.id, "failed", { cause: "test", detail: { coreHours: 0.7 }, patch: { failureReason: "wall_time_exceeded" } });
    await transitionRun(run.id, "queued", { cause: "retry" });
    await transitionRun(run.id, "dispatched", { cause: "test" });
    await transitionRun(run.id, "collecting", { cause: "test", detail: { coreHours: 0.6 } });
    await transitionRun(run.id, "done", { cause: "test" });
    expect(await settleRun(run.id)).toMatchObject({ usedCoreHours: 1.3, charged: 1, released: 0 });
  });
});

describe("failRun and the spec's retry policy", () => {
  it("retries a listed reason up to maxAttempts, then fails for good, settles, and queues one digest", async () => {
    const { runs } = await fixture(2, { retry: { maxAttempts: 2, on: ["nonzero_exit"], resumeOnWallTime: false } });
    const run = runs[0];
    await transitionRun(run.id, "dispatched", { cause: "test" });
    const first = await failRun(run.id, { reason: "nonzero_exit", detail: "exit code 1", stderrTail: "boom", exitCode: 1, coreHours: 0.1 }, { cause: "test" });
    expect(first.retried).toBe(true);
    expect((await db().Run.findByPk(run.id))!).toMatchObject({ state: "queued", attempt: 2, failureReason: null });
    expect(await entries(run.id)).toEqual([]); // not settled while it may still run
    await transitionRun(run.id, "dispatched", { cause: "test" });
    const second = await failRun(run.id, { reason: "nonzero_exit", detail: "exit code 1", stderrTail: "boom", exitCode: 1, coreHours: 0.1 }, { cause: "test" });
    expect(second).toEqual({ retried: false, why: "attempt 2 of at most 2" });
    expect((await db().Run.findByPk(run.id))!).toMatchObject({ state: "failed", failureReason: "nonzero_exit", stderrTail: "boom", exitCode: 1 });
    expect((await entries(run.id)).map((e) => [e.kind, e.coreHours])).toEqual([["charge", 0.2], ["release", 0.8]]);
    // A second failing replica joins the digest already waiting for this ensemble.
    await transitionRun(runs[1].id, "dispatched", { cause: "test" });
    await failRun(runs[1].id, { reason: "node_lost", detail: "lost" }, { cause: "test" });
    const [{ n }] = await t.sequelize.query<{ n: string }>("SELECT count(*) AS n FROM pgboss.job WHERE name = 'failure-digest'", { type: "SELECT" as never });
    expect(Number(n)).toBe(1);
    expect((await db().Ensemble.findByPk(runs[0].ensembleId))!.state).toBe("failed");
  });

  it("decides by reason, wall-time resumption and attempt count", () => {
    const p = retryPolicyOf({ retry: { maxAttempts: 3, on: ["node_lost"], resumeOnWallTime: true } });
    expect(shouldRetry(p, "node_lost", 1).retry).toBe(true);
    expect(shouldRetry(p, "node_lost", 3).retry).toBe(false);
    expect(shouldRetry(p, "wall_time_exceeded", 2).retry).toBe(true);
    expect(shouldRetry(p, "nonzero_exit", 1).retry).toBe(false);
    expect(shouldRetry(p, "cancelled_by_user", 1).retry).toBe(false);
    expect(shouldRetry(retryPolicyOf({}), "node_lost", 1)).toEqual({ retry: false, why: "the retry policy does not cover node_lost" });
    expect(shouldRetry(retryPolicyOf({ retry: { maxAttempts: 5, on: [], resumeOnWallTime: false } }), "wall_time_exceeded", 1).retry).toBe(false);
  });
});

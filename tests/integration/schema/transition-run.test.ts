// transitionRun: every state change writes a RunEvent in the same transaction; illegal moves are refused.
import { beforeAll, describe, expect, it } from "vitest";
import { QueryTypes } from "sequelize";
import { canTransition, recordRunsCreated, RUN_TRANSITIONS, transitionRun } from "@/lib/runs/transition-run";
import { RUN_STATES, type Group, type Run, type RunState, type User } from "@/models";
import { makeEnsemble, makeGroup, makeUser, useTestDatabase } from "../../support/db";

const t = useTestDatabase();
let group: Group;
let owner: User;

beforeAll(async () => {
  group = await makeGroup();
  owner = await makeUser("researcher", group);
});

async function freshRun(): Promise<Run> {
  const { runs } = await makeEnsemble({ owner, group, points: [{ L: 4, T: 2.2 }], replicas: 1 });
  return runs[0];
}
const eventsOf = (runId: string) => t.models.RunEvent.findAll({ where: { runId }, order: [["id", "ASC"]] });

describe("transitionRun", () => {
  it("walks queued → dispatched → running → collecting → done, one event and one timestamp per step", async () => {
    const run = await freshRun();
    await transitionRun(run.id, "dispatched", { cause: "broker.dispatch", patch: { dispatchToken: "tok-1", schedulerJobId: "42" } });
    await transitionRun(run.id, "running", { cause: "poll.started", patch: { progress: 0.1 } });
    await transitionRun(run.id, "collecting", { cause: "poll.exited", patch: { exitCode: 0 }, detail: { elapsedSeconds: 12 } });
    const { run: done, event } = await transitionRun(run.id, "done", { cause: "import.accepted", actorId: owner.id, patch: { coreHoursUsed: 0.0033 } });

    expect(done.state).toBe("done");
    expect(event).toMatchObject({ fromState: "collecting", toState: "done", cause: "import.accepted", actorId: owner.id });
    const stored = await t.models.Run.findByPk(run.id);
    expect(stored).toMatchObject({ state: "done", dispatchToken: "tok-1", schedulerJobId: "42", exitCode: 0, progress: 1, coreHoursUsed: 0.0033 });
    expect(stored!.dispatchedAt!.getTime()).toBeLessThanOrEqual(stored!.startedAt!.getTime());
    expect(stored!.startedAt!.getTime()).toBeLessThanOrEqual(stored!.finishedAt!.getTime());
    const events = await eventsOf(run.id);
    expect(events.map((e) => [e.fromState, e.toState, e.cause])).toEqual([
      [null, "queued", "test.create"],
      ["queued", "dispatched", "broker.dispatch"],
      ["dispatched", "running", "poll.started"],
      ["running", "collecting", "poll.exited"],
      ["collecting", "done", "import.accepted"],
    ]);
    expect(events[3].detail).toEqual({ elapsedSeconds: 12 });
  });

  it("refuses every transition outside the table, with a conflict error naming both states, and writes nothing", async () => {
    const refusedFromQueued = RUN_STATES.filter((s) => !RUN_TRANSITIONS.queued.includes(s));
    expect(refusedFromQueued).toEqual(["queued", "running", "collecting", "done"]);
    const run = await freshRun();
    for (const to of refusedFromQueued) {
      await expect(transitionRun(run.id, to, { cause: "test" })).rejects.toMatchObject({ code: "conflict", message: expect.stringContaining(`from queued to ${to}`) });
    }
    await transitionRun(run.id, "cancelled", { cause: "user.cancel", patch: { failureReason: "cancelled_by_user" } });
    await expect(transitionRun(run.id, "queued", { cause: "retry" })).rejects.toMatchObject({ code: "conflict", message: expect.stringContaining("it is final") });
    expect((await eventsOf(run.id)).map((e) => e.toState)).toEqual(["queued", "cancelled"]);
    expect((await t.models.Run.findByPk(run.id))!.state).toBe("cancelled");
  });

  it("allows exactly the documented pairs (the table is the only source of truth)", () => {
    const allowed = RUN_STATES.flatMap((from) => RUN_STATES.filter((to) => canTransition(from, to)).map((to) => `${from}>${to}`));
    expect(allowed.sort()).toEqual([
      "collecting>cancelled", "collecting>done", "collecting>failed",
      "dispatched>cancelled", "dispatched>collecting", "dispatched>failed", "dispatched>running",
      "failed>queued",
      "queued>cancelled", "queued>dispatched", "queued>failed",
      "running>cancelled", "running>collecting", "running>failed",
    ]);
  });

  it("requires a reason to fail, and a retry starts a clean new attempt while the event keeps the old one", async () => {
    const run = await freshRun();
    await transitionRun(run.id, "dispatched", { cause: "broker.dispatch", patch: { dispatchToken: "tok-r", schedulerJobId: "7" } });
    await expect(transitionRun(run.id, "failed", { cause: "poll.exited" })).rejects.toMatchObject({ code: "bad_request", message: expect.stringContaining("failureReason") });
    await transitionRun(run.id, "failed", { cause: "poll.exited", patch: { failureReason: "nonzero_exit", exitCode: 3, stderrTail: "boom" } });
    const { run: again, event } = await transitionRun(run.id, "queued", { cause: "retry.auto" });
    expect(again).toMatchObject({ state: "queued", attempt: 2, failureReason: null, exitCode: null, stderrTail: null, dispatchToken: null, schedulerJobId: null, dispatchedAt: null, progress: 0 });
    expect(event.detail).toEqual({ previousAttempt: { attempt: 1, failureReason: "nonzero_exit", exitCode: 3, schedulerJobId: "7" } });
    // The fresh attempt goes through the same cycle again.
    await expect(transitionRun(run.id, "dispatched", { cause: "broker.dispatch", patch: { dispatchToken: "tok-r2" } })).resolves.toBeTruthy();
  });

  it("rolls the state change and its event back together when the caller's transaction fails", async () => {
    const run = await freshRun();
    const before = (await eventsOf(run.id)).length;
    await expect(t.sequelize.transaction(async (transaction) => {
      await transitionRun(run.id, "dispatched", { cause: "broker.dispatch", transaction, patch: { dispatchToken: "tok-x" } });
      // Inside the transaction both are visible…
      expect((await t.models.Run.findByPk(run.id, { transaction }))!.state).toBe("dispatched");
      expect(await t.models.RunEvent.count({ where: { runId: run.id }, transaction })).toBe(before + 1);
      throw new Error("submission to the scheduler failed");
    })).rejects.toThrow("submission to the scheduler failed");
    // …and after the rollback neither is.
    const after = await t.models.Run.findByPk(run.id);
    expect(after).toMatchObject({ state: "queued", dispatchToken: null, dispatchedAt: null });
    expect((await eventsOf(run.id)).length).toBe(before);
  });

  it("rolls the state change back when writing the event fails inside transitionRun", async () => {
    const run = await freshRun();
    // An actor that does not exist makes the RunEvent insert fail after the run row was updated.
    await expect(transitionRun(run.id, "dispatched", { cause: "broker.dispatch", actorId: "00000000-0000-4000-8000-000000000000" }))
      .rejects.toMatchObject({ name: "SequelizeForeignKeyConstraintError" });
    expect((await t.models.Run.findByPk(run.id))!.state).toBe("queued");
    expect((await eventsOf(run.id)).length).toBe(1);
  });

  it("serialises concurrent transitions on one run: a second dispatch waits for the first, then is refused", async () => {
    const run = await freshRun();
    const t1 = await t.sequelize.transaction();
    await transitionRun(run.id, "dispatched", { cause: "broker.a", transaction: t1, patch: { dispatchToken: "a" } });
    const t2 = await t.sequelize.transaction();
    let settled = false;
    const second = transitionRun(run.id, "dispatched", { cause: "broker.b", transaction: t2, patch: { dispatchToken: "b" } })
      .then(() => "accepted", (err: { code?: string }) => err.code ?? String(err))
      .finally(() => { settled = true; });
    // Go on once the second call has either finished (nothing held it back) or is blocked on the row lock.
    const blocked = async () => (await t.sequelize.query<{ n: string }>(
      "SELECT count(*) AS n FROM pg_stat_activity WHERE datname = current_database() AND wait_event_type = 'Lock'",
      { type: QueryTypes.SELECT }))[0].n !== "0";
    while (!settled && !(await blocked())) await new Promise((r) => setTimeout(r, 10));
    await t1.commit();
    expect(await second).toBe("conflict"); // it read the run only after the first committed: state dispatched
    await t2.rollback();
    expect((await eventsOf(run.id)).map((e) => e.cause)).toEqual(["test.create", "broker.a"]);
    expect((await t.models.Run.findByPk(run.id))!.dispatchToken).toBe("a");
  });

  it("records the creation of runs written directly in a later state (an uploaded run)", async () => {
    const { ensemble, points } = await makeEnsemble({ owner, group, points: [{ L: 4, T: 3 }], replicas: 0, cluster: null });
    const events = await t.sequelize.transaction(async (transaction) => {
      const run = await t.models.Run.create({ ensembleId: ensemble.id, pointId: points[0].id, replica: 0, seed: "7", source: "upload", state: "collecting" }, { transaction });
      return recordRunsCreated([run], { cause: "upload.accepted", actorId: owner.id, transaction });
    });
    expect(events.map((e) => [e.fromState, e.toState, e.cause, e.actorId])).toEqual([[null, "collecting", "upload.accepted", owner.id]]);
    await expect(transitionRun(events[0].runId, "done", { cause: "import.accepted" })).resolves.toBeTruthy();
  });

  it("says what is wrong with bad input", async () => {
    const run = await freshRun();
    await expect(transitionRun(run.id, "lost" as RunState, { cause: "x" })).rejects.toMatchObject({ code: "bad_request", message: expect.stringContaining('"lost"') });
    await expect(transitionRun(run.id, "dispatched", { cause: " " })).rejects.toMatchObject({ code: "bad_request", message: expect.stringContaining("needs a cause") });
    await expect(transitionRun(run.id, "dispatched", { cause: "x", patch: { progress: Number.NaN } })).rejects.toMatchObject({ code: "bad_request" });
    await expect(transitionRun("00000000-0000-4000-8000-000000000000", "dispatched", { cause: "x" })).rejects.toMatchObject({ code: "not_found" });
    await expect(transitionRun("run-1", "dispatched", { cause: "x" })).rejects.toMatchObject({ code: "bad_request", message: expect.stringContaining('"run-1"') });
  });
});

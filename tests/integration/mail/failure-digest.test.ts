// Failure digests: failed runs of an ensemble become one e-mail to its owner naming each run,
// its point, replica, attempt and reason, with links; reported failures are not mailed again.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { makeEnsemble, makeGroup, makeUser, useTestDatabase } from "../../support/db";
import { env } from "@/lib/env";
import { stopBoss } from "@/lib/queue/boss";
import { transitionRun } from "@/lib/runs/transition-run";
import { listMailbox, readMailboxMessage } from "@/lib/mail/mailbox";
import { shortId } from "@/lib/mail/failure-digest-text";
import { failureDigestJob } from "@/broker/jobs/failure-digest";
import { sendMailJob } from "@/broker/jobs/send-mail";
import type { MailStore } from "@/lib/mail/mail-store-server";
import type { Run } from "@/models";
import { db } from "@/models";
import { startTempMailStore } from "./support";

useTestDatabase();
let store: MailStore;
const ctx = { jobId: "test", retryCount: 0, log: undefined as never };

beforeAll(async () => {
  store = await startTempMailStore();
  env.smtp.port = store.port; // the send-mail handler sends where the broker would: env.smtp.port
});
afterAll(async () => {
  await stopBoss({ graceful: false });
  await store?.close();
});

async function fail(run: Run, reason: "nonzero_exit" | "wall_time_exceeded" | "node_lost", extra: { exitCode?: number; stderrTail?: string; failureDetail?: string } = {}) {
  await transitionRun(run.id, "dispatched", { cause: "test.dispatch" });
  await transitionRun(run.id, "failed", { cause: "test.fail", patch: { failureReason: reason, ...extra } });
}

/** Deliver every pending outbox message through the send-mail handler. */
async function deliverPending() {
  for (const m of await db().OutboxMessage.findAll({ where: { state: "pending" } })) await sendMailJob.handle({ messageId: m.id }, ctx);
}

describe("failure digest", () => {
  it("mails the owner one digest naming all three failed runs, then nothing until a new failure", async () => {
    const group = await makeGroup();
    const owner = await makeUser("researcher", group);
    const { ensemble, runs } = await makeEnsemble({ owner, group, points: [{ L: 8, T: 2.0 }, { L: 8, T: 2.5 }], replicas: 2 });
    const [a, b, c, untouched] = runs;
    await fail(a, "nonzero_exit", { exitCode: 3, stderrTail: "reading run.json\nError: lattice size must be even\n  at check (ising2d.ts:12)\n" });
    await fail(b, "wall_time_exceeded", { failureDetail: "stopped after 60 min at sweep 4100 of 11000" });
    await fail(c, "node_lost");

    const outcome = await failureDigestJob.handle({ ensembleId: ensemble.id }, ctx);
    expect(outcome).toMatchObject({ status: "sent" });
    expect(new Set((outcome as { runIds: string[] }).runIds)).toEqual(new Set([a.id, b.id, c.id]));
    await deliverPending();

    const box = await listMailbox({ dir: store.mailDir, q: owner.email });
    expect(box.total).toBe(1);
    expect(box.data[0].subject).toBe(`[Ergodex] 3 runs failed in ensemble "${ensemble.name}"`);
    const { text } = await readMailboxMessage(box.data[0].id, { dir: store.mailDir });
    expect(text).toContain(`${env.appUrl}/ensembles/${ensemble.id}`);
    for (const r of [a, b, c]) {
      expect(text).toContain(`${env.appUrl}/runs/${r.id}`);
      expect(text).toContain(`Run ${shortId(r.id)}`);
    }
    expect(text).not.toContain(untouched.id);
    expect(text).toContain("point #0 L=8 T=2  replica 0  attempt 1");
    expect(text).toContain("(nonzero_exit), exit code 3");
    expect(text).toContain("| Error: lattice size must be even");
    expect(text).toContain("(wall_time_exceeded)");
    expect(text).toContain("detail: stopped after 60 min at sweep 4100 of 11000");
    expect(text).toContain("(node_lost)");
    expect(text).toContain("By reason: nonzero_exit 1, wall_time_exceeded 1, node_lost 1");

    // Each reported failure event points at the e-mail that reported it.
    const events = await db().RunEvent.findAll({ where: { toState: "failed" } });
    expect(events.filter((e) => [a.id, b.id, c.id].includes(e.runId)).map((e) => e.detail.reportedIn)).toEqual(
      [outcome, outcome, outcome].map((o) => (o as { messageId: string }).messageId));

    // Nothing new: no second e-mail.
    expect(await failureDigestJob.handle({ ensembleId: ensemble.id }, ctx)).toEqual({ status: "nothing-new", runIds: [] });
    expect(await db().OutboxMessage.count({ where: { kind: "run.failed" } })).toBe(1);

    // The fourth run fails later: a second digest names only it.
    await fail(untouched, "nonzero_exit", { exitCode: 1 });
    const second = await failureDigestJob.handle({ ensembleId: ensemble.id }, ctx);
    expect(second).toMatchObject({ status: "sent", runIds: [untouched.id] });
    await deliverPending();
    const after = await listMailbox({ dir: store.mailDir, q: owner.email });
    expect(after.total).toBe(2);
    expect(after.data[0].subject).toBe(`[Ergodex] 1 run failed in ensemble "${ensemble.name}"`);
    const secondText = (await readMailboxMessage(after.data[0].id, { dir: store.mailDir })).text;
    expect(secondText).toContain(untouched.id);
    expect(secondText).not.toContain(a.id);
  });

  it("leaves out a run the retry policy re-queued", async () => {
    const group = await makeGroup();
    const owner = await makeUser("researcher", group);
    const { ensemble, runs } = await makeEnsemble({ owner, group, points: [{ L: 8, T: 2.0 }], replicas: 2 });
    await fail(runs[0], "node_lost");
    await fail(runs[1], "node_lost");
    await transitionRun(runs[1].id, "queued", { cause: "retry" });
    expect(await failureDigestJob.handle({ ensembleId: ensemble.id }, ctx)).toMatchObject({ status: "sent", runIds: [runs[0].id] });
  });

  it("writes nothing when the spec says notify.onFailure: false", async () => {
    const group = await makeGroup();
    const owner = await makeUser("researcher", group);
    const { ensemble, runs } = await makeEnsemble({ owner, group, points: [{ L: 8, T: 2.0 }], replicas: 2 });
    await ensemble.update({ spec: { ...ensemble.spec, notify: { onFailure: false, onDone: false } } });
    const before = await db().OutboxMessage.count();
    for (const r of runs) await fail(r, "nonzero_exit", { exitCode: 2 });
    expect(await failureDigestJob.handle({ ensembleId: ensemble.id }, ctx)).toEqual({ status: "disabled", runIds: [] });
    expect(await db().OutboxMessage.count()).toBe(before);
  });

  it("fails an unknown ensemble for good instead of retrying it", async () => {
    await expect(failureDigestJob.handle({ ensembleId: "00000000-0000-4000-8000-000000000000" }, ctx)).rejects.toMatchObject({ name: "PermanentJobError" });
  });
});

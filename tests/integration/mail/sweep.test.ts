// The sweep's safety nets (stranded mail, unreported failures) and the notify.onDone e-mail.
import { afterAll, describe, expect, it } from "vitest";
import { QueryTypes } from "sequelize";
import { makeEnsemble, makeGroup, makeUser, useTestDatabase } from "../../support/db";
import { stopBoss } from "@/lib/queue/boss";
import { transitionRun } from "@/lib/runs/transition-run";
import { enqueueMail } from "@/lib/mail/enqueue-mail";
import { requeueStrandedMail, requeueUnreportedFailures } from "@/lib/mail/sweep";
import { sendFailureDigest } from "@/lib/mail/failure-digest";
import { enqueueEnsembleDoneMail } from "@/lib/mail/ensemble-done";
import { db } from "@/models";
import { queuedSendMailIds } from "./support";

useTestDatabase();
afterAll(() => stopBoss({ graceful: false }));

const digestJobsFor = async (ensembleId: string) => (await db().sequelize.query<{ n: string }>(
  "SELECT count(*) AS n FROM pgboss.job WHERE name = 'failure-digest' AND data->>'ensembleId' = $1 AND state::text IN ('created', 'retry')",
  { type: QueryTypes.SELECT, bind: [ensembleId] }))[0].n;

describe("sweep", () => {
  it("queues send-mail again for a pending message whose job is gone, once", async () => {
    const { id } = await enqueueMail({ to: ["stranded@example.org"], subject: "Stranded", textBody: "x", kind: "test.stranded" });
    expect(await requeueStrandedMail({ olderThanSeconds: 0 })).not.toContain(id); // its job is still waiting
    await db().sequelize.query("DELETE FROM pgboss.job WHERE name = 'send-mail' AND data->>'messageId' = $1", { bind: [id] });
    expect(await queuedSendMailIds()).not.toContain(id);
    expect(await requeueStrandedMail({ olderThanSeconds: 3600 })).not.toContain(id); // too recent to call stranded
    expect(await requeueStrandedMail({ olderThanSeconds: 0 })).toContain(id);
    expect((await queuedSendMailIds()).filter((m) => m === id)).toHaveLength(1);
    expect(await requeueStrandedMail({ olderThanSeconds: 0 })).not.toContain(id);
  });

  it("queues a digest for a failure nobody reported, and not after the digest reported it", async () => {
    const group = await makeGroup();
    const owner = await makeUser("researcher", group);
    const { ensemble, runs } = await makeEnsemble({ owner, group, points: [{ L: 8, T: 2.0 }], replicas: 1 });
    await transitionRun(runs[0].id, "failed", { cause: "test.fail", patch: { failureReason: "dispatch_failed" } });
    expect(await requeueUnreportedFailures({ olderThanSeconds: 0 })).toEqual([ensemble.id]);
    expect(await digestJobsFor(ensemble.id)).toBe("1");
    expect(await requeueUnreportedFailures({ olderThanSeconds: 0 })).toEqual([ensemble.id]);
    expect(await digestJobsFor(ensemble.id)).toBe("1"); // the waiting digest absorbs the second request
    expect((await sendFailureDigest(ensemble.id)).status).toBe("sent");
    expect(await requeueUnreportedFailures({ olderThanSeconds: 0 })).toEqual([]);
  });
});

describe("notify.onDone", () => {
  it("mails the owner once when the ensemble has ended, only if asked", async () => {
    const group = await makeGroup();
    const owner = await makeUser("researcher", group);
    const { ensemble, runs } = await makeEnsemble({ owner, group, points: [{ L: 8, T: 2.0 }], replicas: 2 });
    await ensemble.update({ spec: { ...ensemble.spec, notify: { onFailure: true, onDone: true } } });
    expect(await enqueueEnsembleDoneMail(ensemble.id)).toBeNull(); // still active
    for (const r of runs) {
      await transitionRun(r.id, "dispatched", { cause: "test" });
      await transitionRun(r.id, "collecting", { cause: "test" });
      await transitionRun(r.id, "done", { cause: "test", patch: { coreHoursUsed: 1.25 } });
    }
    await ensemble.update({ state: "done", finishedAt: new Date() });
    const first = await enqueueEnsembleDoneMail(ensemble.id);
    expect(first?.created).toBe(true);
    expect(await enqueueEnsembleDoneMail(ensemble.id)).toEqual({ id: first!.id, created: false });
    const mail = (await db().OutboxMessage.findByPk(first!.id))!;
    expect(mail.to).toEqual([owner.email]);
    expect(mail.subject).toBe(`[Ergodex] Ensemble "${ensemble.name}" has ended (done)`);
    expect(mail.textBody).toContain("Runs: 2 (done 2)");
    expect(mail.textBody).toContain("Core-hours used: 2.5 of");

    const quiet = await makeEnsemble({ owner, group, points: [{ L: 8, T: 2.0 }], replicas: 1 });
    await quiet.ensemble.update({ state: "cancelled" });
    expect(await enqueueEnsembleDoneMail(quiet.ensemble.id)).toBeNull(); // the default is no
  });
});

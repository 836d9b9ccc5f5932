// The whole path through pg-boss, with the broker's own worker wiring (broker/jobs/run-job.ts):
// enqueueMail → send-mail job → SMTP down → failed attempt recorded → pg-boss retries → delivered once.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { useTestDatabase } from "../../support/db";
import { env } from "@/lib/env";
import { log } from "@/lib/log";
import { startBoss, stopBoss } from "@/lib/queue/boss";
import { enqueueMail } from "@/lib/mail/enqueue-mail";
import { listMailbox } from "@/lib/mail/mailbox";
import { sendMailJob } from "@/broker/jobs/send-mail";
import { startWorkers } from "@/broker/jobs/run-job";
import type { JobDefinition } from "@/broker/jobs/types";
import type { MailStore } from "@/lib/mail/mail-store-server";
import { db } from "@/models";
import { deadPort, startTempMailStore } from "./support";

useTestDatabase();
let store: MailStore;

/** Poll `check` until it returns a value, or fail with what was awaited. */
async function until<T>(what: string, check: () => Promise<T | null | undefined | false>, limitMs = 20_000): Promise<T> {
  const t0 = Date.now();
  for (;;) {
    const v = await check();
    if (v) return v;
    if (Date.now() - t0 > limitMs) throw new Error(`gave up waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 200));
  }
}

beforeAll(async () => {
  store = await startTempMailStore();
  env.smtp.port = await deadPort(); // SMTP is down when the first attempt runs
  const boss = await startBoss({ worker: true });
  // The real definition with a 1 s retry delay instead of 10 s, so the retry comes within the test.
  const quick = { ...sendMailJob, retry: { limit: 3, delaySeconds: 1, backoff: false } } as unknown as JobDefinition<never>;
  await startWorkers(boss, quick, log.child({ test: "mail" }, { level: "silent" }), 0.5);
});
afterAll(async () => {
  await stopBoss({ graceful: false });
  await store?.close();
});

describe("send-mail through pg-boss", () => {
  it("records the failed attempt while SMTP is down and delivers the message once it is back", async () => {
    const { id } = await enqueueMail({ to: ["queue@example.org"], subject: "Through the queue", textBody: "hello", kind: "test.queue" });
    const failed = await until("a failed attempt", async () => {
      const m = await db().OutboxMessage.findByPk(id);
      return m && m.attempts >= 1 ? m : null;
    });
    expect(failed.state).toBe("pending");
    expect(failed.lastError).toMatch(/transient failure: .*ECONNREFUSED/);

    env.smtp.port = store.port; // SMTP comes back
    const sent = await until("the message sent", async () => {
      const m = await db().OutboxMessage.findByPk(id);
      return m?.state === "sent" ? m : null;
    });
    expect(sent.attempts).toBeGreaterThanOrEqual(2);
    const box = await listMailbox({ dir: store.mailDir, q: "Through the queue" });
    expect(box.total).toBe(1);
    expect(box.data[0].to).toEqual(["queue@example.org"]);
  });
});

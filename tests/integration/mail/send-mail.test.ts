// The outbox → SMTP path: a message is written with its job in one transaction, sent by the
// send-mail handler to a real loopback SMTP server, and stored there with its headers and body.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { SMTPServer } from "smtp-server";
import type { AddressInfo } from "node:net";
import { useTestDatabase } from "../../support/db";
import { env } from "@/lib/env";
import { stopBoss } from "@/lib/queue/boss";
import { enqueueMail } from "@/lib/mail/enqueue-mail";
import { sendOutboxMessage } from "@/lib/mail/send-outbox-message";
import { listMailbox, readMailboxMessage } from "@/lib/mail/mailbox";
import { classifySmtpError } from "@/lib/mail/smtp";
import { sendMailJob, TransientMailError } from "@/broker/jobs/send-mail";
import type { MailStore } from "@/lib/mail/mail-store-server";
import { db } from "@/models";
import { deadPort, queuedSendMailIds, startTempMailStore } from "./support";

const t = useTestDatabase();
let store: MailStore;
const ctx = { jobId: "test", retryCount: 0, log: undefined as never };

beforeAll(async () => {
  store = await startTempMailStore();
  // The job handler sends to env.smtp.port, as in the broker; point it at this file's server.
  env.smtp.port = store.port;
});
afterAll(async () => {
  await stopBoss({ graceful: false });
  await store?.close();
});

describe("enqueueMail", () => {
  it("writes the outbox row and its send-mail job together", async () => {
    const { id, created } = await enqueueMail({ to: ["Alice@Example.org"], subject: "Hello", textBody: "Body", kind: "test.hello" });
    expect(created).toBe(true);
    const row = await db().OutboxMessage.findByPk(id);
    expect(row).toMatchObject({ to: ["alice@example.org"], state: "pending", attempts: 0, kind: "test.hello" });
    expect(await queuedSendMailIds()).toContain(id);
  });

  it("leaves neither row nor job when the caller's transaction rolls back", async () => {
    const before = await db().OutboxMessage.count();
    const jobsBefore = (await queuedSendMailIds()).length;
    let id = "";
    await expect(t.sequelize.transaction(async (transaction) => {
      id = (await enqueueMail({ to: ["bob@example.org"], subject: "Never", textBody: "x", kind: "test.rollback" }, { transaction })).id;
      throw new Error("caller fails after writing the mail");
    })).rejects.toThrow("caller fails");
    expect(id).not.toBe("");
    expect(await db().OutboxMessage.count()).toBe(before);
    expect((await queuedSendMailIds()).length).toBe(jobsBefore);
  });

  it("writes a dedupeKey once: the second call returns the first id and queues nothing", async () => {
    const mail = { to: ["carol@example.org"], subject: "Once", textBody: "x", kind: "test.dedupe", dedupeKey: "test:dedupe:1" };
    const first = await enqueueMail(mail);
    const jobs = (await queuedSendMailIds()).length;
    const second = await enqueueMail({ ...mail, subject: "Twice?" });
    expect(second).toEqual({ id: first.id, created: false });
    expect(await db().OutboxMessage.count({ where: { dedupeKey: "test:dedupe:1" } })).toBe(1);
    expect((await queuedSendMailIds()).length).toBe(jobs);
  });

  it("refuses a bad address, naming the field", async () => {
    await expect(enqueueMail({ to: ["not an address"], subject: "x", textBody: "x", kind: "test.bad" })).rejects.toMatchObject({
      code: "invalid", details: { issues: [{ path: "/to/0" }] },
    });
  });
});

describe("send-mail", () => {
  it("delivers a message to the SMTP server with its headers and body, once", async () => {
    const body = "Three runs failed.\nSee http://127.0.0.1/ensembles/x\n— Ergodex";
    const { id } = await enqueueMail({ to: ["dora@example.org", "eve@example.org"], subject: "Digest: ünïcode ok", textBody: body, kind: "test.deliver" });
    const outcome = await sendMailJob.handle({ messageId: id }, ctx);
    expect(outcome).toEqual({ status: "sent", attempts: 1 });
    const row = (await db().OutboxMessage.findByPk(id))!;
    expect(row.state).toBe("sent");
    expect(row.sentAt).toBeInstanceOf(Date);

    const { data } = await listMailbox({ dir: store.mailDir, q: "Digest:" });
    expect(data).toHaveLength(1);
    expect(data[0]).toMatchObject({ from: "ergodex@ergodex.invalid", to: ["dora@example.org", "eve@example.org"], subject: "Digest: ünïcode ok" });
    const msg = await readMailboxMessage(data[0].id, { dir: store.mailDir });
    expect(msg.text.trim()).toBe(body);
    expect(msg.messageId).toBe(`<outbox.${id}@ergodex.invalid>`);
    expect(msg.headers["x-ergodex-kind"]).toBe("test.deliver");
    expect(msg.headers["x-ergodex-outbox-id"]).toBe(id);
    expect(msg.headerTo).toBe("dora@example.org, eve@example.org");

    // A duplicate job for the same message sends nothing.
    expect(await sendMailJob.handle({ messageId: id }, ctx)).toEqual({ status: "already-sent", attempts: 1 });
    expect((await listMailbox({ dir: store.mailDir, q: "Digest:" })).total).toBe(1);
  });

  it("records a failed attempt while SMTP is down, and a later retry delivers it", async () => {
    const { id } = await enqueueMail({ to: ["frank@example.org"], subject: "Retry me", textBody: "x", kind: "test.retry" });
    env.smtp.port = await deadPort();
    try {
      await expect(sendMailJob.handle({ messageId: id }, ctx)).rejects.toBeInstanceOf(TransientMailError);
    } finally {
      env.smtp.port = store.port;
    }
    const afterFailure = (await db().OutboxMessage.findByPk(id))!;
    expect(afterFailure).toMatchObject({ state: "pending", attempts: 1 });
    expect(afterFailure.lastError).toMatch(/^attempt 1: transient failure: .*ECONNREFUSED/);
    expect((await listMailbox({ dir: store.mailDir, q: "Retry me" })).total).toBe(0);

    expect(await sendMailJob.handle({ messageId: id }, ctx)).toEqual({ status: "sent", attempts: 2 });
    expect((await listMailbox({ dir: store.mailDir, q: "Retry me" })).total).toBe(1);
  });

  it("gives up after the last attempt", async () => {
    const { id } = await enqueueMail({ to: ["gina@example.org"], subject: "Down for good", textBody: "x", kind: "test.giveup" });
    const port = await deadPort();
    expect((await sendOutboxMessage(id, { port, maxAttempts: 2 })).status).toBe("retry");
    expect(await sendOutboxMessage(id, { port, maxAttempts: 2 })).toMatchObject({ status: "failed", attempts: 2 });
    expect((await sendOutboxMessage(id)).status).toBe("already-failed");
    expect((await db().OutboxMessage.findByPk(id))!.state).toBe("failed");
  });

  it("does not retry a permanent refusal (550 for the recipient)", async () => {
    const refusing = new SMTPServer({
      authOptional: true, disabledCommands: ["STARTTLS"], logger: false,
      onRcptTo(_addr, _session, cb) { cb(Object.assign(new Error("no such mailbox"), { responseCode: 550 })); },
    });
    await new Promise<void>((r) => refusing.listen(0, "127.0.0.1", () => r()));
    const port = (refusing.server.address() as AddressInfo).port;
    try {
      const { id } = await enqueueMail({ to: ["nobody@example.org"], subject: "Refused", textBody: "x", kind: "test.refused" });
      const outcome = await sendOutboxMessage(id, { port });
      expect(outcome).toMatchObject({ status: "failed", attempts: 1 });
      expect(outcome.error).toMatch(/permanent failure: EENVELOPE 550/);
    } finally {
      await new Promise<void>((r) => refusing.close(() => r()));
    }
  });

  it("refuses a message over the server's size limit as permanent (552)", async () => {
    const small = await startTempMailStore({ maxBytes: 2_000 });
    try {
      const { id } = await enqueueMail({ to: ["hal@example.org"], subject: "Too big", textBody: "x".repeat(5_000), kind: "test.size" });
      const outcome = await sendOutboxMessage(id, { port: small.port });
      expect(outcome.status).toBe("failed");
      expect(outcome.error).toMatch(/552/);
      expect((await listMailbox({ dir: small.mailDir })).total).toBe(0);
    } finally {
      await small.close();
    }
  });

  it("classifies SMTP faults as RFC 5321 reply classes say", () => {
    expect(classifySmtpError({ code: "ESOCKET", message: "connect ECONNREFUSED" })).toBe("transient");
    expect(classifySmtpError({ code: "ETIMEDOUT" })).toBe("transient");
    expect(classifySmtpError({ code: "EENVELOPE", responseCode: 451 })).toBe("transient");
    expect(classifySmtpError({ code: "EMESSAGE", responseCode: 554 })).toBe("permanent");
    expect(classifySmtpError({ code: "EENVELOPE" })).toBe("permanent");
  });
});

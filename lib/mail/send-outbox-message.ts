import "server-only";
// Sending one outbox message: the work of the "send-mail" job. Idempotent: a message already
// sent (or given up on) is left alone, and the row is locked while it is being sent so two
// workers holding duplicate jobs cannot both deliver it.
import { modelsFor } from "@/lib/db/models-for";
import { AppError } from "@/lib/errors";
import { classifySmtpError, describeSmtpError, MAIL_FROM, smtpTransport, type SmtpTarget } from "./smtp";

/** Sends tried per message before it is marked failed; the send-mail job's retry limit matches it. */
export const MAIL_MAX_ATTEMPTS = 5;

/**
 * What happened: "sent" now; "already-sent" or "already-failed" by an earlier attempt (nothing
 * done); "retry" after a transient fault with attempts left (the caller should try again
 * later); "failed" after a permanent fault or the last attempt.
 */
export type SendOutcome = { status: "sent" | "already-sent" | "already-failed" | "retry" | "failed"; attempts: number; error?: string };

/** Send outbox message `messageId` over SMTP and record the attempt. */
export async function sendOutboxMessage(messageId: string, options: SmtpTarget & { maxAttempts?: number } = {}): Promise<SendOutcome> {
  if (typeof messageId !== "string" || !/^[0-9]{1,19}$/.test(messageId)) {
    throw new AppError("bad_request", `outbox message id ${JSON.stringify(messageId)} is not a positive integer`);
  }
  const maxAttempts = options.maxAttempts ?? MAIL_MAX_ATTEMPTS;
  const { sequelize, OutboxMessage } = modelsFor();
  return sequelize.transaction(async (transaction) => {
    const message = await OutboxMessage.findByPk(messageId, { transaction, lock: transaction.LOCK.UPDATE });
    if (!message) throw new AppError("not_found", `outbox message ${messageId} does not exist`);
    if (message.state === "sent") return { status: "already-sent", attempts: message.attempts };
    if (message.state === "failed") return { status: "already-failed", attempts: message.attempts, error: message.lastError ?? undefined };
    const attempts = message.attempts + 1;
    const transport = smtpTransport(options);
    try {
      await transport.sendMail({
        from: MAIL_FROM,
        to: message.to,
        subject: message.subject,
        text: message.textBody,
        html: message.htmlBody ?? undefined,
        date: message.createdAt,
        // Stable per outbox row: a receiver can tell a redelivery (after a crash between SMTP "250" and our commit) from a new message.
        messageId: `<outbox.${message.id}@ergodex.invalid>`,
        headers: { "X-Ergodex-Kind": message.kind, "X-Ergodex-Outbox-Id": message.id },
      });
    } catch (err) {
      const kind = classifySmtpError(err);
      const error = `attempt ${attempts}: ${kind} failure: ${describeSmtpError(err)}`;
      const giveUp = kind === "permanent" || attempts >= maxAttempts;
      await message.update({ attempts, lastError: error, state: giveUp ? "failed" : "pending" }, { transaction });
      return { status: giveUp ? "failed" : "retry", attempts, error };
    } finally {
      transport.close();
    }
    await message.update({ attempts, state: "sent", sentAt: new Date() }, { transaction });
    return { status: "sent", attempts };
  });
}

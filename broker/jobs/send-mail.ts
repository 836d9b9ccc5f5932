// send-mail {messageId}: deliver one outbox message (lib/mail/send-outbox-message.ts).
// Decided here: transient SMTP faults (connection refused, 4xx) throw, so pg-boss retries with
// backoff; permanent ones (5xx, an address the server refuses) are recorded on the message and
// end the job; an unknown message is a PermanentJobError.
import { AppError } from "@/lib/errors";
import { MAIL_MAX_ATTEMPTS, sendOutboxMessage } from "@/lib/mail/send-outbox-message";
import { defineJob, PermanentJobError } from "./types";

/** A send that a later attempt may fix; the queue retries the job. */
export class TransientMailError extends Error {
  constructor(message: string) { super(message); this.name = "TransientMailError"; }
}

export const sendMailJob = defineJob<{ messageId: string }>({
  name: "send-mail",
  schema: {
    type: "object",
    additionalProperties: false,
    required: ["messageId"],
    properties: { messageId: { type: "string", pattern: "^[0-9]{1,19}$" } },
  },
  async handle(data, ctx) {
    let outcome;
    try {
      outcome = await sendOutboxMessage(data.messageId);
    } catch (err) {
      if (err instanceof AppError && (err.code === "not_found" || err.code === "bad_request")) throw new PermanentJobError(err.message, { cause: err });
      throw err;
    }
    ctx?.log?.info({ messageId: data.messageId, ...outcome }, "send-mail");
    if (outcome.status === "retry") throw new TransientMailError(outcome.error ?? "transient SMTP failure");
    return outcome;
  },
  // One job run per send attempt: MAIL_MAX_ATTEMPTS in all, 10 s, 20 s, 40 s … apart.
  retry: { limit: MAIL_MAX_ATTEMPTS - 1, delaySeconds: 10, backoff: true },
  expireInSeconds: 60,
});

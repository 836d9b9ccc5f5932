import "server-only";
// Every e-mail starts here: an OutboxMessage row and its "send-mail" job, in one transaction, so a
// message is either both written and queued or neither (nothing is lost, nothing sent twice by accident).
import { QueryTypes, type Transaction } from "sequelize";
import { modelsFor } from "@/lib/db/models-for";
import { enqueue } from "@/lib/queue/enqueue";
import { validate } from "@/lib/validation";

/** What to send; `dedupeKey`, when set, makes the message unique: the same key is written once. */
export type MailInput = {
  to: string[];
  subject: string;
  textBody: string;
  htmlBody?: string | null;
  /** What the message is about, e.g. "run.failed", "allocation.80", "cluster.fault". */
  kind: string;
  dedupeKey?: string | null;
};

/** The outbox row's id; `created` is false when a message with the same dedupeKey already existed. */
export type EnqueuedMail = { id: string; created: boolean };

/** Largest body accepted, well under the mail server's 10 MB message limit. */
export const MAX_BODY_CHARS = 1_000_000;

export const mailInputSchema = {
  type: "object",
  additionalProperties: false,
  required: ["to", "subject", "textBody", "kind"],
  properties: {
    to: { type: "array", minItems: 1, maxItems: 200, items: { type: "string", format: "email", maxLength: 320 } },
    subject: { type: "string", minLength: 1, maxLength: 300, pattern: "^[^\\r\\n]*$" },
    textBody: { type: "string", minLength: 1, maxLength: MAX_BODY_CHARS },
    htmlBody: { type: ["string", "null"], maxLength: MAX_BODY_CHARS },
    kind: { type: "string", pattern: "^[a-z][a-z0-9._-]{0,63}$" },
    dedupeKey: { type: ["string", "null"], minLength: 1, maxLength: 500 },
  },
} as const;

/**
 * Write an e-mail to the outbox and queue its "send-mail" job in the caller's transaction (or in
 * one of its own). A second call with the same dedupeKey writes and queues nothing and returns
 * the first message's id.
 */
export async function enqueueMail(input: MailInput, options: { transaction?: Transaction } = {}): Promise<EnqueuedMail> {
  const mail = validate<MailInput>(mailInputSchema, input, "e-mail");
  const to = [...new Set(mail.to.map((a) => a.trim().toLowerCase()))];
  const { sequelize } = modelsFor(options.transaction);
  const work = async (transaction: Transaction): Promise<EnqueuedMail> => {
    // ON CONFLICT rather than catching a unique violation: a failed INSERT would abort the caller's transaction.
    const inserted = await sequelize.query<{ id: string }>(
      `INSERT INTO outbox_messages ("to", subject, text_body, html_body, kind, dedupe_key)
       VALUES ($1::text[], $2, $3, $4, $5, $6)
       ON CONFLICT (dedupe_key) WHERE dedupe_key IS NOT NULL DO NOTHING
       RETURNING id::text AS id`,
      { type: QueryTypes.SELECT, transaction, bind: [to, mail.subject, mail.textBody, mail.htmlBody ?? null, mail.kind, mail.dedupeKey ?? null] },
    );
    if (inserted.length === 0) {
      const [existing] = await sequelize.query<{ id: string }>(
        "SELECT id::text AS id FROM outbox_messages WHERE dedupe_key = $1", { type: QueryTypes.SELECT, transaction, bind: [mail.dedupeKey] });
      // Only a concurrent delete between the two statements could leave nothing; say so rather than crash on undefined.
      if (!existing) throw new Error(`outbox message with dedupeKey ${JSON.stringify(mail.dedupeKey)} vanished while being written`);
      return { id: existing.id, created: false };
    }
    const id = inserted[0].id;
    await enqueue("send-mail", { messageId: id }, { transaction });
    return { id, created: true };
  };
  return options.transaction ? work(options.transaction) : sequelize.transaction(work);
}

// The loopback SMTP server that stands in for a real mail relay: it accepts every message and
// keeps it as a raw .eml file plus one line of index.jsonl, which the Mailbox page reads.
// Used by scripts/fake-smtp.ts and started in-process by the mail tests.
import crypto from "node:crypto";
import fs from "node:fs";
import path from "node:path";
import type { AddressInfo } from "node:net";
import { SMTPServer, type SMTPServerDataStream, type SMTPServerSession } from "smtp-server";
import { simpleParser } from "mailparser";

/** One line of index.jsonl: what the Mailbox lists without opening the .eml. */
export type StoredMailIndex = { id: string; from: string; to: string[]; subject: string; receivedAt: string; bytes: number };

/** Options of a mail store server. */
export type MailStoreOptions = {
  mailDir: string;
  /** 0 = a free port (tests). */
  port: number;
  host?: string;
  /** Largest message accepted, in bytes (larger ones are refused with 552). */
  maxBytes?: number;
  /** Called after each stored message. */
  onStored?: (entry: StoredMailIndex) => void;
};

/** A running mail store server. */
export type MailStore = { port: number; mailDir: string; close(): Promise<void> };

export const INDEX_FILE = "index.jsonl";
export const DEFAULT_MAX_BYTES = 10 * 1024 * 1024;

/** An id that sorts by arrival and is safe as a file name. */
function newId(now: Date): string {
  return `${now.toISOString().replace(/[-:.]/g, "").toLowerCase()}-${crypto.randomBytes(4).toString("hex")}`;
}

function smtpError(message: string, responseCode: number): Error {
  return Object.assign(new Error(message), { responseCode });
}

async function store(mailDir: string, raw: Buffer, session: SMTPServerSession): Promise<StoredMailIndex> {
  const now = new Date();
  const id = newId(now);
  // The subject is read from the headers (decoded); the envelope gives the true sender and recipients.
  const parsed = await simpleParser(raw, { skipHtmlToText: true, skipTextToHtml: true, skipImageLinks: true });
  const mailFrom = session.envelope.mailFrom;
  const entry: StoredMailIndex = {
    id,
    from: mailFrom ? mailFrom.address : "",
    to: session.envelope.rcptTo.map((r) => r.address),
    subject: parsed.subject ?? "",
    receivedAt: now.toISOString(),
    bytes: raw.length,
  };
  // The .eml is complete on disk before its index line appears, so a reader never sees a dangling entry.
  const file = path.join(mailDir, `${id}.eml`);
  await fs.promises.writeFile(`${file}.part`, raw);
  await fs.promises.rename(`${file}.part`, file);
  await fs.promises.appendFile(path.join(mailDir, INDEX_FILE), JSON.stringify(entry) + "\n");
  return entry;
}

/** Start an SMTP server on 127.0.0.1 that stores every accepted message under `mailDir`. */
export async function startMailStore(options: MailStoreOptions): Promise<MailStore> {
  const { mailDir } = options;
  const maxBytes = options.maxBytes ?? DEFAULT_MAX_BYTES;
  await fs.promises.mkdir(mailDir, { recursive: true });
  const server = new SMTPServer({
    name: "ergodex-mailbox",
    banner: "Ergodex loopback mailbox",
    // Loopback only and nothing leaves it: no TLS, and any (or no) login is accepted.
    authOptional: true,
    disabledCommands: ["STARTTLS"],
    size: maxBytes,
    logger: false,
    onAuth(_auth, _session, callback) { callback(null, { user: "anyone" }); },
    onData(stream: SMTPServerDataStream, session: SMTPServerSession, callback: (err?: Error | null) => void) {
      const chunks: Buffer[] = [];
      stream.on("data", (c: Buffer) => chunks.push(c));
      stream.on("error", (err) => callback(err));
      stream.on("end", () => {
        if (stream.sizeExceeded) return callback(smtpError(`message exceeds the ${maxBytes}-byte limit`, 552));
        store(mailDir, Buffer.concat(chunks), session)
          .then((entry) => { options.onStored?.(entry); callback(null); })
          .catch((err: Error) => callback(smtpError(`could not store the message: ${err.message}`, 451)));
      });
    },
  });
  await new Promise<void>((resolve, reject) => {
    server.once("error", reject);
    server.listen(options.port, options.host ?? "127.0.0.1", () => { server.off("error", reject); resolve(); });
  });
  const port = (server.server.address() as AddressInfo).port;
  return {
    port,
    mailDir,
    close: () => new Promise<void>((resolve) => server.close(() => resolve())),
  };
}

import "server-only";
// What the loopback mail server received (lib/mail/mail-store-server.ts), for the Mailbox page
// and its API: a listing from index.jsonl, and one message opened from its .eml with mailparser.
import fs from "node:fs";
import path from "node:path";
import { simpleParser, type AddressObject } from "mailparser";
import { env } from "@/lib/env";
import { AppError } from "@/lib/errors";
import { INDEX_FILE, type StoredMailIndex } from "./mail-store-server";

/** A listing query: free text matched against recipients, sender and subject. */
export type MailboxQuery = { q?: string; limit?: number; offset?: number; dir?: string };

/** A page of the listing, newest first; `total` counts every match. */
export type MailboxPage = { data: StoredMailIndex[]; total: number };

/** One opened message. */
export type MailboxMessage = StoredMailIndex & {
  messageId: string | null;
  date: string | null;
  headerFrom: string;
  headerTo: string;
  text: string;
  html: string | null;
  headers: Record<string, string>;
};

const ID = /^[0-9a-z]+-[0-9a-f]{8}$/;
const MAX_LIMIT = 500;

function isEntry(x: unknown): x is StoredMailIndex {
  const e = x as StoredMailIndex;
  return !!e && typeof e.id === "string" && ID.test(e.id) && Array.isArray(e.to) && typeof e.subject === "string" && typeof e.receivedAt === "string";
}

/** Every index entry, oldest first; a torn last line (the server died mid-write) is left out. */
async function readIndex(dir: string): Promise<StoredMailIndex[]> {
  let raw: string;
  try {
    raw = await fs.promises.readFile(path.join(dir, INDEX_FILE), "utf8");
  } catch (err) {
    if ((err as NodeJS.ErrnoException).code === "ENOENT") return []; // nothing received yet
    throw err;
  }
  const entries: StoredMailIndex[] = [];
  for (const line of raw.split("\n")) {
    if (!line.trim()) continue;
    try {
      const e = JSON.parse(line) as unknown;
      if (isEntry(e)) entries.push(e);
    } catch { /* a torn line: the .eml it described is still readable by id */ }
  }
  return entries;
}

function bounded(n: number | undefined, fallback: number, max: number, what: string): number {
  if (n === undefined) return fallback;
  if (!Number.isInteger(n) || n < 0 || n > max) throw new AppError("bad_request", `${what} must be an integer in [0, ${max}], got ${n}`);
  return n;
}

/** Stored messages, newest first, optionally filtered by a case-insensitive text in to/from/subject. */
export async function listMailbox(query: MailboxQuery = {}): Promise<MailboxPage> {
  const limit = bounded(query.limit, 100, MAX_LIMIT, "limit");
  const offset = bounded(query.offset, 0, Number.MAX_SAFE_INTEGER, "offset");
  const needle = query.q?.trim().toLowerCase() ?? "";
  const all = (await readIndex(query.dir ?? env.smtp.mailDir)).reverse();
  const hits = needle
    ? all.filter((m) => m.subject.toLowerCase().includes(needle) || m.from.toLowerCase().includes(needle) || m.to.some((t) => t.toLowerCase().includes(needle)))
    : all;
  return { data: hits.slice(offset, offset + limit), total: hits.length };
}

const addresses = (a: AddressObject | AddressObject[] | undefined) => (a ? (Array.isArray(a) ? a.map((x) => x.text).join(", ") : a.text) : "");

/** Open one stored message by id (404 for an unknown or malformed id). */
export async function readMailboxMessage(id: string, options: { dir?: string } = {}): Promise<MailboxMessage> {
  if (typeof id !== "string" || !ID.test(id)) throw new AppError("not_found", "no such message in the mailbox");
  const dir = options.dir ?? env.smtp.mailDir;
  let raw: Buffer;
  try {
    raw = await fs.promises.readFile(path.join(dir, `${id}.eml`));
  } catch (err) {
    if ((err as NodeJS.ErrnoException).code === "ENOENT") throw new AppError("not_found", "no such message in the mailbox");
    throw err;
  }
  const parsed = await simpleParser(raw, { skipImageLinks: true });
  const entry = (await readIndex(dir)).find((e) => e.id === id);
  const headers: Record<string, string> = {};
  for (const line of parsed.headerLines) {
    const colon = line.line.indexOf(":");
    headers[line.key] = colon >= 0 ? line.line.slice(colon + 1).trim() : line.line;
  }
  return {
    id,
    from: entry?.from ?? parsed.from?.value[0]?.address ?? "",
    to: entry?.to ?? (parsed.to ? (Array.isArray(parsed.to) ? parsed.to : [parsed.to]).flatMap((a) => a.value.map((v) => v.address ?? "")) : []),
    subject: parsed.subject ?? entry?.subject ?? "",
    receivedAt: entry?.receivedAt ?? (await fs.promises.stat(path.join(dir, `${id}.eml`))).mtime.toISOString(),
    bytes: raw.length,
    messageId: parsed.messageId ?? null,
    date: parsed.date ? parsed.date.toISOString() : null,
    headerFrom: addresses(parsed.from),
    headerTo: addresses(parsed.to),
    text: parsed.text ?? "",
    html: typeof parsed.html === "string" ? parsed.html : null,
    headers,
  };
}

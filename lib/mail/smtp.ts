// The outgoing SMTP side: one nodemailer transport to the loopback server, and the rule that
// decides which SMTP failures a later attempt can fix.
import nodemailer from "nodemailer";
import { env } from "@/lib/env";

/** The envelope sender of every message; the loopback relay accepts any, and .invalid never resolves. */
export const MAIL_FROM = "Ergodex <ergodex@ergodex.invalid>";

/** Where mail goes; defaults to the loopback fake server of lib/env.ts. */
export type SmtpTarget = { host?: string; port?: number };

/** A nodemailer transport to the loopback server: plain SMTP, no TLS, no login. */
export function smtpTransport(target: SmtpTarget = {}) {
  return nodemailer.createTransport({
    host: target.host ?? "127.0.0.1",
    port: target.port ?? env.smtp.port,
    secure: false,
    ignoreTLS: true,
    // Loopback answers in milliseconds; a server that does not is down for our purposes.
    connectionTimeout: 5_000,
    greetingTimeout: 5_000,
    socketTimeout: 15_000,
  });
}

/** Whether a failed send may succeed later ("transient") or never will ("permanent"). */
export type SmtpFailureKind = "transient" | "permanent";

type SmtpError = Error & { code?: string; responseCode?: number };

/**
 * Classify a nodemailer error. Decided here: a reply code 4xx is transient and 5xx permanent
 * (RFC 5321 §4.2.1); without a reply, connection faults (refused, reset, timeout) are transient,
 * while an envelope or message nodemailer itself refuses (no valid recipient, bad address) is permanent.
 */
export function classifySmtpError(err: unknown): SmtpFailureKind {
  const e = err as SmtpError;
  const reply = typeof e?.responseCode === "number" ? e.responseCode : undefined;
  if (reply !== undefined) return reply >= 500 ? "permanent" : "transient";
  if (e?.code === "EENVELOPE" || e?.code === "EMESSAGE") return "permanent";
  return "transient";
}

/** A short, single-line description of a send failure for OutboxMessage.lastError. */
export function describeSmtpError(err: unknown): string {
  const e = err as SmtpError;
  const parts = [e?.code, e?.responseCode ? String(e.responseCode) : undefined, e?.message ?? String(err)].filter(Boolean);
  return parts.join(" ").replace(/\s+/g, " ").slice(0, 1_000);
}

// Shared by the mail tests: a loopback mail store in a temporary folder, a port nobody listens
// on, and a look at the send-mail jobs pg-boss holds.
import fs from "node:fs";
import net from "node:net";
import os from "node:os";
import path from "node:path";
import { QueryTypes } from "sequelize";
import { startMailStore, type MailStore } from "@/lib/mail/mail-store-server";
import { db } from "@/models";

/** A mail store on a free port in a fresh temporary folder. */
export async function startTempMailStore(options: { maxBytes?: number } = {}): Promise<MailStore> {
  const mailDir = fs.mkdtempSync(path.join(os.tmpdir(), "ergodex-mail-"));
  return startMailStore({ port: 0, mailDir, ...options });
}

/** A port that was free a moment ago and has nothing listening on it: "SMTP is down". */
export async function deadPort(): Promise<number> {
  const server = net.createServer();
  await new Promise<void>((r) => server.listen(0, "127.0.0.1", () => r()));
  const { port } = server.address() as net.AddressInfo;
  await new Promise<void>((r) => server.close(() => r()));
  return port;
}

/** The messageIds of the send-mail jobs queued in the test database. */
export async function queuedSendMailIds(): Promise<string[]> {
  const rows = await db().sequelize.query<{ message_id: string }>(
    "SELECT data->>'messageId' AS message_id FROM pgboss.job WHERE name = 'send-mail' ORDER BY created_on",
    { type: QueryTypes.SELECT },
  );
  return rows.map((r) => r.message_id);
}

// The loopback mail server as npm start runs it (scripts/fake-smtp.ts as a child process), and
// the Mailbox reader over what it stored: newest first, search by recipient and subject.
import { spawn, type ChildProcess } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import nodemailer from "nodemailer";
import { listMailbox, readMailboxMessage } from "@/lib/mail/mailbox";
import { deadPort } from "./support";

let child: ChildProcess | undefined;
let dataDir: string;
let port: number;
let output = "";

function waitFor(text: string, ms = 20_000): Promise<void> {
  return new Promise((resolve, reject) => {
    const timer = setTimeout(() => reject(new Error(`fake-smtp did not print "${text}"; output so far: ${output}`)), ms);
    const look = () => { if (output.includes(text)) { clearTimeout(timer); resolve(); } };
    child!.stdout!.on("data", look);
    child!.on("exit", (code) => { clearTimeout(timer); reject(new Error(`fake-smtp exited with ${code}: ${output}`)); });
    look();
  });
}

beforeAll(async () => {
  dataDir = fs.mkdtempSync(path.join(os.tmpdir(), "ergodex-fake-smtp-"));
  port = await deadPort();
  child = spawn(process.execPath, ["--conditions=react-server", "--import", "tsx", "scripts/fake-smtp.ts"], {
    env: { ...process.env, ERGODEX_DATA_DIR: dataDir, ERGODEX_SMTP_PORT: String(port) },
    stdio: ["ignore", "pipe", "pipe"],
  });
  child.stdout!.on("data", (c: Buffer) => { output += c.toString(); });
  child.stderr!.on("data", (c: Buffer) => { output += c.toString(); });
  await waitFor("fake SMTP ready");
});
afterAll(() => { if (child && child.exitCode === null) child.kill("SIGKILL"); });

const mailDir = () => path.join(dataDir, "mail");

describe("fake SMTP server and mailbox", () => {
  it("stores each message as .eml with an index line, lists newest first and searches", async () => {
    const transport = nodemailer.createTransport({ host: "127.0.0.1", port, secure: false, ignoreTLS: true });
    for (const [to, subject] of [["ana@example.org", "First: allocation at 80 %"], ["ben@example.org", "Second: 3 runs failed"], ["ana@example.org", "Third: cluster unreachable"]]) {
      await transport.sendMail({ from: "ergodex@ergodex.invalid", to, subject, text: `${subject}\nbody` });
    }
    transport.close();

    const index = fs.readFileSync(path.join(mailDir(), "index.jsonl"), "utf8").trim().split("\n").map((l) => JSON.parse(l));
    expect(index).toHaveLength(3);
    for (const e of index) {
      expect(Object.keys(e).sort()).toEqual(["bytes", "from", "id", "receivedAt", "subject", "to"]);
      expect(fs.statSync(path.join(mailDir(), `${e.id}.eml`)).size).toBe(e.bytes);
    }

    const all = await listMailbox({ dir: mailDir() });
    expect(all.total).toBe(3);
    expect(all.data.map((m) => m.subject.split(":")[0])).toEqual(["Third", "Second", "First"]);
    expect((await listMailbox({ dir: mailDir(), q: "ANA@example" })).data.map((m) => m.subject.split(":")[0])).toEqual(["Third", "First"]);
    expect((await listMailbox({ dir: mailDir(), q: "runs failed" })).data.map((m) => m.to)).toEqual([["ben@example.org"]]);
    expect((await listMailbox({ dir: mailDir(), limit: 1, offset: 1 })).data.map((m) => m.subject.split(":")[0])).toEqual(["Second"]);

    const opened = await readMailboxMessage(all.data[1].id, { dir: mailDir() });
    expect(opened.text.trim()).toBe("Second: 3 runs failed\nbody");
    expect(opened.from).toBe("ergodex@ergodex.invalid");
  });

  it("answers an unknown or path-like id with not_found", async () => {
    await expect(readMailboxMessage("../../etc/passwd", { dir: mailDir() })).rejects.toMatchObject({ code: "not_found" });
    await expect(readMailboxMessage("20250101t000000000z-00000000", { dir: mailDir() })).rejects.toMatchObject({ code: "not_found" });
    await expect(listMailbox({ dir: mailDir(), limit: -1 })).rejects.toMatchObject({ code: "bad_request" });
  });

  it("an empty mailbox lists nothing", async () => {
    expect(await listMailbox({ dir: path.join(dataDir, "never-created") })).toEqual({ data: [], total: 0 });
  });

  it("shuts down cleanly on SIGTERM", async () => {
    const exited = new Promise<{ code: number | null; signal: string | null }>((r) => child!.once("exit", (code, signal) => r({ code, signal })));
    child!.kill("SIGTERM");
    expect(await exited).toEqual({ code: 0, signal: null });
    expect(output).toContain("SIGTERM: closing the fake SMTP server");
  });
});

// The loopback fake SMTP server of `npm start` and `npm test`: stores every message under
// env.smtp.mailDir (raw .eml + index.jsonl) for the Mailbox page. Stops cleanly on SIGTERM/SIGINT.
import { env } from "../lib/env";
import { startMailStore } from "../lib/mail/mail-store-server";

const store = await startMailStore({
  port: env.smtp.port,
  mailDir: env.smtp.mailDir,
  onStored: (m) => console.log(`stored ${m.id} from ${m.from} to ${m.to.join(", ")}: ${m.subject} (${m.bytes} bytes)`),
});
console.log(`fake SMTP ready on 127.0.0.1:${store.port}, storing in ${store.mailDir}`);

let stopping = false;
async function stop(signal: string) {
  if (stopping) return;
  stopping = true;
  console.log(`${signal}: closing the fake SMTP server`);
  // Connections in the middle of a message get a moment to finish; then the process leaves anyway.
  const timer = setTimeout(() => process.exit(0), 5_000);
  timer.unref();
  await store.close();
  process.exit(0);
}
process.on("SIGTERM", () => void stop("SIGTERM"));
process.on("SIGINT", () => void stop("SIGINT"));

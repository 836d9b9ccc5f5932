// Seeds the demo scenario (idempotent) and links the app to the loopback fake cluster:
// pins the cluster's host key and authorises the app's own key pair on it.
import fs from "node:fs";
import path from "node:path";
import { generateSshKeyPair } from "../lib/ssh/generate-key-pair";
import { env } from "../lib/env";
import { seedDemo } from "../lib/seed/seed-demo";
import { db } from "../models";
import { loadOrCreateHostKey, authorizedKeysPath } from "../cluster-fake/server/keys";
import { sshKeyFingerprint } from "../broker/adapters/host-key-fingerprint";

const stateDir = env.cluster.stateDir;
const hostKey = loadOrCreateHostKey(stateDir);

function clientPrivateKey(): string {
  const pair = generateSshKeyPair("ergodex-broker");
  const file = authorizedKeysPath(stateDir);
  fs.mkdirSync(path.dirname(file), { recursive: true });
  fs.appendFileSync(file, `${pair.public.trim()}\n`, { mode: 0o600 });
  return pair.private;
}

const result = await seedDemo({
  host: "127.0.0.1", port: env.cluster.port, username: "ergodex", hostKeyFingerprint: sshKeyFingerprint(hostKey.publicKey),
  clientPrivateKey, workDir: "work", samplerCommand: "npm run sampler --", slotLimit: env.cluster.slots,
});
console.log(result.created.length ? `seeded: ${result.created.join("; ")}` : "demo scenario already present; nothing changed");
await db().sequelize.close();

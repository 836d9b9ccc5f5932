import fs from "node:fs";
import path from "node:path";
import { timingSafeEqual } from "node:crypto";
import ssh2 from "ssh2";
import type { ParsedKey } from "ssh2";
import { generateSshKeyPair } from "../../lib/ssh/generate-key-pair";

const { utils } = ssh2;

/** The node's host key pair in OpenSSH format. */
export interface HostKey {
  privateKey: string;
  /** "ssh-ed25519 AAAA… comment", as an OpenSSH .pub file holds it. */
  publicKey: string;
}

/** Load the host key from the state dir, generating it on first start. */
export function loadOrCreateHostKey(stateDir: string): HostKey {
  const keyFile = path.join(stateDir, "host_ed25519_key");
  const pubFile = `${keyFile}.pub`;
  if (!fs.existsSync(keyFile)) {
    const pair = generateSshKeyPair("ergodex-cluster-fake");
    fs.mkdirSync(stateDir, { recursive: true });
    // "wx": two processes starting on the same state dir must not overwrite each other's key.
    fs.writeFileSync(keyFile, pair.private, { mode: 0o600, flag: "wx" });
    fs.writeFileSync(pubFile, `${pair.public}\n`, { mode: 0o644 });
  }
  const privateKey = fs.readFileSync(keyFile, "utf8");
  const parsed = utils.parseKey(privateKey);
  if (parsed instanceof Error) throw new Error(`host key ${keyFile}: ${parsed.message}`);
  const key = Array.isArray(parsed) ? parsed[0] : parsed;
  const publicKey = `${key.type} ${key.getPublicSSH().toString("base64")} ergodex-cluster-fake`;
  return { privateKey, publicKey };
}

/** Path of the authorized_keys file the seed writes the app's public key into. */
export function authorizedKeysPath(stateDir: string): string {
  return path.join(stateDir, "authorized_keys");
}

/**
 * Parse an authorized_keys file: one OpenSSH public key per line, # comments.
 * Option prefixes (command="…" etc.) are not supported; such lines are skipped and reported.
 */
export function readAuthorizedKeys(file: string): { keys: ParsedKey[]; skipped: string[] } {
  if (!fs.existsSync(file)) return { keys: [], skipped: [] };
  const keys: ParsedKey[] = [];
  const skipped: string[] = [];
  fs.readFileSync(file, "utf8").split(/\r?\n/).forEach((line, i) => {
    const text = line.trim();
    if (text === "" || text.startsWith("#")) return;
    const parsed = utils.parseKey(text);
    if (parsed instanceof Error) {
      skipped.push(`${file}:${i + 1}: ${parsed.message}`);
      return;
    }
    keys.push(Array.isArray(parsed) ? parsed[0] : parsed);
  });
  return { keys, skipped };
}

/** The authorized key matching the offered algorithm and key blob, if any. */
export function findAuthorizedKey(keys: ParsedKey[], algo: string, data: Buffer): ParsedKey | null {
  for (const key of keys) {
    const blob = key.getPublicSSH();
    if (key.type === algo && blob.length === data.length && timingSafeEqual(blob, data)) return key;
  }
  return null;
}

import { createHash } from "node:crypto";
import ssh2 from "ssh2";

/** A pinned host-key fingerprint as OpenSSH prints it: "SHA256:" + unpadded base64 of 32 bytes. */
export const FINGERPRINT_PATTERN = /^SHA256:[A-Za-z0-9+/]{43}$/;

/** SHA256 fingerprint of the raw SSH wire-format key blob. */
export function fingerprintOfBlob(blob: Buffer): string {
  return `SHA256:${createHash("sha256").update(blob).digest("base64").replace(/=+$/, "")}`;
}

/**
 * SHA256 fingerprint of a public key, in the "SHA256:…" form `ssh-keygen -l` prints.
 * Accepts an OpenSSH public key line ("ssh-ed25519 AAAA… comment") or a private key (its public half).
 */
export function sshKeyFingerprint(key: string | Buffer): string {
  const parsed = ssh2.utils.parseKey(key);
  if (parsed instanceof Error) throw new Error(`cannot compute fingerprint: not an SSH key (${parsed.message})`);
  const k = Array.isArray(parsed) ? parsed[0] : parsed;
  return fingerprintOfBlob(k.getPublicSSH());
}

/** Normalise a pinned fingerprint, or throw saying what is wrong with it. */
export function parsePinnedFingerprint(value: string): string {
  const v = value.trim().replace(/=+$/, "");
  if (!FINGERPRINT_PATTERN.test(v)) {
    throw new Error(`pinned host-key fingerprint "${value}" is not of the form SHA256:<43 base64 characters>`);
  }
  return v;
}

// AES-256-GCM for secrets at rest (cluster private keys). Node's crypto is the library here.
import crypto from "node:crypto";
import { env } from "../env";

const VERSION = "v1";

/** Encrypt to "v1:<iv>:<tag>:<ciphertext>" (base64url parts). */
export function sealSecret(plain: string, key: Buffer = env.keyEncryptionKey): string {
  const iv = crypto.randomBytes(12);
  const cipher = crypto.createCipheriv("aes-256-gcm", key, iv);
  const ct = Buffer.concat([cipher.update(plain, "utf8"), cipher.final()]);
  return [VERSION, iv.toString("base64url"), cipher.getAuthTag().toString("base64url"), ct.toString("base64url")].join(":");
}

/** Decrypt what sealSecret produced; a wrong key or a tampered payload throws. */
export function openSecret(sealed: string, key: Buffer = env.keyEncryptionKey): string {
  const [v, iv, tag, ct] = sealed.split(":");
  if (v !== VERSION || !iv || !tag || !ct) throw new Error("sealed secret has an unknown format");
  const decipher = crypto.createDecipheriv("aes-256-gcm", key, Buffer.from(iv, "base64url"));
  decipher.setAuthTag(Buffer.from(tag, "base64url"));
  return Buffer.concat([decipher.update(Buffer.from(ct, "base64url")), decipher.final()]).toString("utf8");
}

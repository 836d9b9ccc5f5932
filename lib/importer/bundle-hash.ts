// A bundle's identity for the Import row: the manifest's sha256, or a listing hash when there is no manifest.
import crypto from "node:crypto";
import fs from "node:fs";
import path from "node:path";
import { hashFile } from "@/lib/storage/hash-file";
import { manifestHash, readManifestBytes } from "./read-manifest";

/** Version of the importer's rules, recorded on every Import row. */
export const IMPORTER_VERSION = "1.0.0";

/**
 * sha256 of manifest.json's bytes when present (it pins every other file by hash, so equal
 * manifests mean equal bundles). A folder without a manifest still needs a key for its rejected
 * Import row: the hash of its sorted file listing (name and sha256 of each regular file).
 */
export async function bundleHashOf(dir: string): Promise<string> {
  let bytes: Buffer | null = null;
  try {
    bytes = readManifestBytes(dir);
  } catch {
    // A manifest that is a link or too large is refused later; the listing still identifies the folder.
  }
  if (bytes) return manifestHash(bytes);
  const h = crypto.createHash("sha256").update("ergodex.bundle-without-manifest\n");
  const names = fs.readdirSync(dir, { withFileTypes: true }).filter((e) => e.isFile()).map((e) => e.name).sort();
  for (const name of names) h.update(`${name}\t${(await hashFile(path.join(dir, name))).sha256}\n`);
  return h.digest("hex");
}

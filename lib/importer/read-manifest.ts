// Read and check manifest.json of a bundle folder: present, JSON, the right format, the schema.
import crypto from "node:crypto";
import fs from "node:fs";
import path from "node:path";
import { AppError } from "@/lib/errors";
import { validate } from "@/lib/validation";
import { bundleError } from "./bundle-error";
import { manifestSchema, RESULT_FORMAT, type Manifest } from "./manifest-schema";

export const MANIFEST = "manifest.json";
const MAX_MANIFEST_BYTES = 1 << 20;

/** manifest.json's raw bytes, or null when the bundle has none (a symlink counts as none). */
export function readManifestBytes(dir: string): Buffer | null {
  const file = path.join(dir, MANIFEST);
  let st: fs.Stats;
  try {
    st = fs.lstatSync(file);
  } catch {
    return null;
  }
  if (!st.isFile()) throw bundleError({ file: MANIFEST }, "is not a regular file (links are not accepted)");
  if (st.size > MAX_MANIFEST_BYTES) throw bundleError({ file: MANIFEST }, `is ${st.size} bytes, more than the limit of ${MAX_MANIFEST_BYTES}`);
  return fs.readFileSync(file);
}

/** The bundle's identity: sha256 of manifest.json's bytes (it lists every other file by hash). */
export function manifestHash(bytes: Buffer): string {
  return crypto.createHash("sha256").update(bytes).digest("hex");
}

/** Parse and validate manifest bytes; AppError("invalid") naming the field on any problem. */
export function parseManifest(bytes: Buffer): Manifest {
  let data: unknown;
  try {
    data = JSON.parse(bytes.toString("utf8"));
  } catch (err) {
    throw bundleError({ file: MANIFEST }, `is not valid JSON (${(err as Error).message})`);
  }
  if (typeof data !== "object" || data === null || Array.isArray(data)) throw bundleError({ file: MANIFEST }, "must be a JSON object");
  const format = (data as { format?: unknown }).format;
  if (format !== RESULT_FORMAT) {
    throw bundleError({ file: MANIFEST, field: "/format" }, `is ${JSON.stringify(format)}, expected "${RESULT_FORMAT}"`);
  }
  try {
    return validate<Manifest>(manifestSchema, data, MANIFEST);
  } catch (err) {
    if (!(err instanceof AppError)) throw err;
    const first = err.details?.issues?.[0];
    throw new AppError("invalid", err.message, { file: MANIFEST, field: first?.path, issues: err.details?.issues });
  }
}

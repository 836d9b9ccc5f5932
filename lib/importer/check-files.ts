// The bundle on disk against its manifest: no links anywhere, every listed file present with its hash and size.
import fs from "node:fs";
import path from "node:path";
import { hashFile } from "@/lib/storage/hash-file";
import { bundleError } from "./bundle-error";
import type { Manifest } from "./manifest-schema";

const MAX_ENTRIES = 10_000;

/** Refuse a bundle folder that contains a symbolic link or anything but files and folders. */
export function checkNoLinks(dir: string): void {
  let count = 0;
  const walk = (rel: string) => {
    for (const entry of fs.readdirSync(path.join(dir, rel), { withFileTypes: true })) {
      const name = rel ? `${rel}/${entry.name}` : entry.name;
      if (++count > MAX_ENTRIES) throw bundleError({ file: rel || "." }, `the bundle holds more than ${MAX_ENTRIES} entries`);
      if (entry.isSymbolicLink()) throw bundleError({ file: name }, "is a symbolic link; bundles must contain plain files only");
      if (entry.isDirectory()) walk(name);
      else if (!entry.isFile()) throw bundleError({ file: name }, "is not a regular file");
    }
  };
  const st = fs.lstatSync(dir);
  if (!st.isDirectory()) throw bundleError({ file: dir }, "the bundle is not a folder");
  walk("");
}

/** Check each manifest-listed file exists as a regular file inside `dir` with the listed sha256 and size. */
export async function checkListedFiles(dir: string, m: Manifest): Promise<void> {
  const root = fs.realpathSync(dir);
  for (const [i, f] of m.files.entries()) {
    const full = path.join(root, f.path);
    let st: fs.Stats;
    try {
      st = fs.lstatSync(full);
    } catch {
      throw bundleError({ file: f.path }, `is listed in manifest.json (/files/${i}) but missing from the bundle`);
    }
    if (!st.isFile()) throw bundleError({ file: f.path }, "is not a regular file");
    if (!fs.realpathSync(full).startsWith(root + path.sep)) throw bundleError({ file: f.path }, "resolves outside the bundle");
    if (st.size !== f.bytes) {
      throw bundleError({ file: f.path }, `is ${st.size} bytes but manifest.json /files/${i}/bytes says ${f.bytes} (truncated or altered)`);
    }
    const { sha256 } = await hashFile(full);
    if (sha256 !== f.sha256) {
      throw bundleError({ file: f.path }, `sha256 is ${sha256} but manifest.json /files/${i}/sha256 says ${f.sha256} (the file was altered)`);
    }
  }
}

// Bundles in an unpacked upload: every folder holding a manifest.json (not searched below it).
import fs from "node:fs";
import path from "node:path";

/** A candidate bundle folder and the path it is shown by. */
export type FoundBundle = { dir: string; rel: string };

/**
 * The bundle folders under `root`. A tree with files but no manifest.json anywhere still yields
 * one candidate — its first folder holding files — so the refusal names the missing manifest.
 */
export function findBundles(root: string): FoundBundle[] {
  const found: FoundBundle[] = [];
  let firstWithFiles: string | null = null;
  const walk = (dir: string) => {
    const entries = fs.readdirSync(dir, { withFileTypes: true }).sort((a, b) => a.name.localeCompare(b.name));
    if (entries.some((e) => e.name === "manifest.json")) {
      found.push({ dir, rel: path.relative(root, dir) });
      return;
    }
    if (firstWithFiles === null && entries.some((e) => e.isFile())) firstWithFiles = dir;
    for (const e of entries) if (e.isDirectory()) walk(path.join(dir, e.name));
  };
  walk(root);
  if (found.length === 0 && firstWithFiles !== null) found.push({ dir: firstWithFiles, rel: path.relative(root, firstWithFiles) });
  return found;
}

/** Every file below `dir`, as paths relative to it (sorted). */
export function listFiles(dir: string): string[] {
  const out: string[] = [];
  const walk = (d: string) => {
    for (const e of fs.readdirSync(d, { withFileTypes: true })) {
      const full = path.join(d, e.name);
      if (e.isDirectory()) walk(full);
      else out.push(path.relative(dir, full));
    }
  };
  walk(dir);
  return out.sort();
}

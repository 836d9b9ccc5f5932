// Checks of a schema-valid manifest that a JSON Schema cannot express: unique names, safe paths.
import { bundleError } from "./bundle-error";
import type { Manifest } from "./manifest-schema";
import { MANIFEST } from "./read-manifest";

// A bundle is one flat folder (or plain subfolders); nothing may point outside it or hide in it.
const SAFE_SEGMENT = /^[A-Za-z0-9_][A-Za-z0-9_.-]*$/;

/** Whether a manifest file path stays inside the bundle folder (relative, no "..", no odd bytes). */
export function isSafeBundlePath(p: string): boolean {
  if (p.length === 0 || p.length > 255 || p.startsWith("/")) return false;
  return p.split("/").every((seg) => SAFE_SEGMENT.test(seg) && seg !== "." && seg !== "..");
}

/** Refuse a manifest that did not finish, repeats names, or lists unsafe or duplicate paths. */
export function checkManifest(m: Manifest): void {
  if (m.exitStatus !== 0) {
    throw bundleError({ file: MANIFEST, field: "/exitStatus" }, `is ${m.exitStatus}: the sampler did not finish successfully`);
  }
  const seen = new Set<string>();
  m.observables.forEach((o, i) => {
    const field = `/observables/${i}/name`;
    if (o.name === "sweep") throw bundleError({ file: MANIFEST, field }, `"sweep" is the series' first column, not an observable`);
    if (seen.has(o.name)) throw bundleError({ file: MANIFEST, field }, `observable "${o.name}" is listed twice`);
    seen.add(o.name);
  });
  const paths = new Set<string>();
  m.files.forEach((f, i) => {
    const field = `/files/${i}/path`;
    if (!isSafeBundlePath(f.path)) throw bundleError({ file: MANIFEST, field }, `${JSON.stringify(f.path)} is not a plain relative path inside the bundle`);
    if (f.path === MANIFEST) throw bundleError({ file: MANIFEST, field }, "the manifest cannot list itself");
    if (paths.has(f.path)) throw bundleError({ file: MANIFEST, field }, `${JSON.stringify(f.path)} is listed twice`);
    paths.add(f.path);
  });
  if (!paths.has(m.series.file)) {
    throw bundleError({ file: MANIFEST, field: "/series/file" }, `${JSON.stringify(m.series.file)} is not among the listed files`);
  }
  const ext = m.series.encoding === "csv" ? ".csv" : ".f64le";
  if (!m.series.file.endsWith(ext)) {
    throw bundleError({ file: MANIFEST, field: "/series/file" }, `${JSON.stringify(m.series.file)} does not end in ${ext} as encoding "${m.series.encoding}" requires`);
  }
}

// Everything a bundle must satisfy before a single row is written; the first problem found is thrown.
import path from "node:path";
import { bundleError } from "./bundle-error";
import { checkListedFiles, checkNoLinks } from "./check-files";
import { checkManifest } from "./check-manifest";
import type { Manifest } from "./manifest-schema";
import { parseCsvSeries, parseF64leSeries, type ParsedSeries } from "./parse-series";
import { MANIFEST, parseManifest } from "./read-manifest";

/** What the bundle must agree with: the run it is imported as, and that run's sampler version. */
export type BundleExpectation = {
  /** Set for cluster results: the manifest must name this run and seed. Uploads come from elsewhere. */
  runId?: string;
  seed?: string;
  sampler: { name: string; version: string; observables: readonly string[] };
  /** The parameter point's params; the manifest's params must contain each with the same value (defaults may be added). */
  params: Record<string, unknown>;
};

/** A bundle that passed: its manifest and its series in columns. */
export type ValidBundle = { manifest: Manifest; series: ParsedSeries };

const same = (a: unknown, b: unknown) => JSON.stringify(a) === JSON.stringify(b);

/** Check the manifest against the run and the sampler (AppError("invalid") naming the field). */
export function checkAgainstRun(m: Manifest, want: BundleExpectation): void {
  const at = (field: string) => ({ file: MANIFEST, field });
  if (want.runId !== undefined && m.runId !== want.runId) throw bundleError(at("/runId"), `is ${JSON.stringify(m.runId)}, but the bundle is imported as run ${want.runId}`);
  if (want.seed !== undefined && m.seed !== want.seed) throw bundleError(at("/seed"), `is ${m.seed}, the run's seed is ${want.seed}`);
  if (m.sampler.name !== want.sampler.name) throw bundleError(at("/sampler/name"), `is ${JSON.stringify(m.sampler.name)}, the run's ensemble uses sampler "${want.sampler.name}"`);
  if (m.sampler.version !== want.sampler.version) throw bundleError(at("/sampler/version"), `is ${JSON.stringify(m.sampler.version)}, the run's ensemble uses ${want.sampler.name} ${want.sampler.version}`);
  const known = new Set(want.sampler.observables);
  m.observables.forEach((o, i) => {
    if (!known.has(o.name)) {
      throw bundleError(at(`/observables/${i}/name`), `"${o.name}" is not an observable of ${want.sampler.name} ${want.sampler.version} (known: ${[...known].join(", ")})`);
    }
  });
  for (const [key, value] of Object.entries(want.params)) {
    if (!same(m.params[key], value)) throw bundleError(at(`/params/${key}`), `is ${JSON.stringify(m.params[key])}, the run's parameter point has ${JSON.stringify(value)}`);
  }
}

/**
 * Validate bundle folder `dir` whose manifest bytes were already read: manifest format and
 * schema, agreement with the run, no links, every listed file's size and sha256, then the series
 * (header, row count, finite values, strictly increasing sweeps).
 */
export async function validateBundle(dir: string, manifestBytes: Buffer, want: (m: Manifest) => Promise<BundleExpectation>): Promise<ValidBundle> {
  const manifest = parseManifest(manifestBytes);
  checkManifest(manifest);
  checkAgainstRun(manifest, await want(manifest));
  checkNoLinks(dir);
  await checkListedFiles(dir, manifest);
  const { file, encoding, rows } = manifest.series;
  const names = manifest.observables.map((o) => o.name);
  const full = path.join(dir, file);
  const series = encoding === "csv" ? await parseCsvSeries(full, file, names, rows) : parseF64leSeries(full, file, names, rows);
  if (series.rows !== rows) throw bundleError({ file }, `has ${series.rows} rows, manifest.json /series/rows says ${rows}`);
  return { manifest, series };
}

// Tampered, truncated and malformed bundles: each refused with its own reason, nothing left but a rejected Import.
import fs from "node:fs";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { importBundle } from "@/lib/importer/import-bundle";
import { db, type Run } from "@/models";
import { makeEnsemble, makeGroup, makeUser, useTestDatabase } from "@/tests/support/db";
import { cleanupTemp, copyBundle, editCsv, editManifest, fixHashes, sampleBundle, registerIsing, tableCounts } from "./bundles";

useTestDatabase();
const PARAMS = { L: 8, T: 2.3, algorithm: "metropolis" };
let runs: Run[];
let csv: string;
let f64: string;

afterAll(cleanupTemp);

beforeAll(async () => {
  const group = await makeGroup();
  const owner = await makeUser("researcher", group);
  const sampler = await registerIsing();
  ({ runs } = await makeEnsemble({ owner, group, sampler, points: [PARAMS], replicas: 2 }));
  csv = sampleBundle(runs[0], PARAMS, { measurements: 200 });
  f64 = sampleBundle(runs[0], PARAMS, { measurements: 200, encoding: "f64le" });
});

/** Import `dir` as runs[0]; expect AppError(code) matching `reason`, a rejected Import with that reason, and no other rows. */
async function expectRejected(dir: string, reason: RegExp, code = "invalid"): Promise<void> {
  const before = await tableCounts();
  const err = await importBundle({ runId: runs[0].id, dir, source: "cluster" }).then(() => null, (e) => e);
  expect(err, "the bundle was accepted").not.toBeNull();
  expect(err.code).toBe(code);
  expect(err.message).toMatch(reason);
  const after = await tableCounts();
  expect({ ...after, rejected: 0 }).toEqual({ ...before, rejected: 0 });
  expect(after.rejected).toBeGreaterThanOrEqual(before.rejected);
  const row = await db().Import.findByPk(err.details.importId);
  expect(row).toMatchObject({ state: "rejected", rejectReason: err.message });
}

const csvCase = (change: (lines: string[]) => void) => {
  const dir = copyBundle(csv);
  editCsv(dir, change);
  return dir;
};
const manifestCase = (change: (m: Record<string, any>) => void, src = csv) => { // eslint-disable-line @typescript-eslint/no-explicit-any
  const dir = copyBundle(src);
  editManifest(dir, change);
  return dir;
};
const setCell = (lines: string[], line: number, column: number, value: string) => {
  const cells = lines[line - 1].split(",");
  cells[column] = value;
  lines[line - 1] = cells.join(",");
};

describe("bundles refused with a reason naming file and line or field", () => {
  it("missing manifest", async () => {
    const dir = copyBundle(csv);
    fs.rmSync(path.join(dir, "manifest.json"));
    await expectRejected(dir, /^manifest\.json: is missing/);
  });

  it("manifest that is not JSON", async () => {
    const dir = copyBundle(csv);
    fs.writeFileSync(path.join(dir, "manifest.json"), '{"format": "ergodex.result/1",');
    await expectRejected(dir, /^manifest\.json: is not valid JSON/);
  });

  it("wrong format tag", async () => {
    await expectRejected(manifestCase((m) => { m.format = "ergodex.result/0"; }), /manifest\.json \/format: is "ergodex\.result\/0", expected "ergodex\.result\/1"/);
  });

  it("schema violation names the field", async () => {
    await expectRejected(manifestCase((m) => { m.series.rows = "200"; }), /manifest\.json.*\/series\/rows must be integer/);
  });

  it("hash mismatch: one digit of the series changed, manifest left alone", async () => {
    const dir = copyBundle(csv);
    editCsv(dir, (lines) => { lines[5] = lines[5].replace(/\d(?=\n|$)/, (d) => String((Number(d) + 1) % 10)); }, false);
    await expectRejected(dir, /^series\.csv: sha256 is [0-9a-f]{64} but manifest\.json \/files\/0\/sha256 says/);
  });

  it("truncated series in transit: size differs from the manifest", async () => {
    const dir = copyBundle(csv);
    const file = path.join(dir, "series.csv");
    fs.truncateSync(file, fs.statSync(file).size - 17);
    await expectRejected(dir, /^series\.csv: is \d+ bytes but manifest\.json \/files\/0\/bytes says \d+ \(truncated or altered\)/);
  });

  it("truncated series with a manifest that matches it: the cut-off last row", async () => {
    const dir = copyBundle(csv);
    const file = path.join(dir, "series.csv");
    fs.truncateSync(file, fs.statSync(file).size - 7);
    fixHashes(dir);
    await expectRejected(dir, /^series\.csv line 201: does not end with a newline: the last row is incomplete/);
  });

  it("NaN, with line and column", async () => {
    await expectRejected(csvCase((l) => setCell(l, 10, 1, "NaN")), /^series\.csv line 10 column "e": "NaN" is not finite/);
  });

  it("Infinity, with line and column", async () => {
    await expectRejected(csvCase((l) => setCell(l, 33, 3, "-Infinity")), /^series\.csv line 33 column "m2": "-Infinity" is not finite/);
  });

  it("a number too large for a float64", async () => {
    await expectRejected(csvCase((l) => setCell(l, 12, 4, "1e999")), /^series\.csv line 12 column "m4": "1e999" overflows/);
  });

  it("text that is not a number, and an empty cell", async () => {
    await expectRejected(csvCase((l) => setCell(l, 7, 2, "0x1f")), /^series\.csv line 7 column "absM": "0x1f" is not a decimal number/);
    await expectRejected(csvCase((l) => setCell(l, 8, 2, "")), /^series\.csv line 8 column "absM": "" is not a decimal number/);
  });

  it("duplicate sweep", async () => {
    await expectRejected(csvCase((l) => setCell(l, 21, 0, l[19].split(",")[0])), /^series\.csv line 21 column "sweep": sweep \d+ repeats the sweep of line 20/);
  });

  it("non-monotonic sweep", async () => {
    await expectRejected(csvCase((l) => setCell(l, 40, 0, "3")), /^series\.csv line 40 column "sweep": sweep 3 is smaller than \d+ at line 39/);
  });

  it("a row with a missing column", async () => {
    await expectRejected(csvCase((l) => { l[49] = l[49].split(",").slice(0, 4).join(","); }), /^series\.csv line 50: has 4 columns, the header has 5/);
  });

  it("header that does not match the manifest's observables", async () => {
    await expectRejected(csvCase((l) => { l[0] = "sweep,e,m2,absM,m4"; }), /^series\.csv line 1: header must be "sweep,e,absM,m2,m4"/);
  });

  it("unknown observable", async () => {
    const dir = manifestCase((m) => { m.observables[1].name = "magnetisation"; });
    await expectRejected(dir, /manifest\.json \/observables\/1\/name: "magnetisation" is not an observable of ising2d 1\.0\.0/);
  });

  it("wrong runId: the bundle of another run", async () => {
    const dir = manifestCase((m) => { m.runId = runs[1].id; });
    await expectRejected(dir, new RegExp(`manifest\\.json /runId: is "${runs[1].id}", but the bundle is imported as run ${runs[0].id}`));
  });

  it("seed, sampler version and parameters that are not the run's", async () => {
    await expectRejected(manifestCase((m) => { m.seed = "42"; }), /manifest\.json \/seed: is 42, the run's seed is/);
    await expectRejected(manifestCase((m) => { m.sampler.version = "0.9.0"; }), /manifest\.json \/sampler\/version: is "0\.9\.0"/);
    await expectRejected(manifestCase((m) => { m.params.T = 2.5; }), /manifest\.json \/params\/T: is 2\.5, the run's parameter point has 2\.3/);
  });

  it("row count mismatch, both ways", async () => {
    await expectRejected(manifestCase((m) => { m.series.rows = 199; }), /^series\.csv line 201: more data rows than manifest\.json \/series\/rows = 199/);
    await expectRejected(manifestCase((m) => { m.series.rows = 201; }), /^series\.csv: has 200 data rows, manifest\.json \/series\/rows says 201/);
  });

  it("a run that did not finish", async () => {
    await expectRejected(manifestCase((m) => { m.exitStatus = 3; }), /manifest\.json \/exitStatus: is 3/);
  });

  it("a listed file that is missing, and a path escaping the bundle", async () => {
    const missing = copyBundle(csv);
    fs.rmSync(path.join(missing, "progress.json"));
    await expectRejected(missing, /^progress\.json: is listed in manifest\.json \(\/files\/1\) but missing/);
    await expectRejected(manifestCase((m) => { m.files[1].path = "../progress.json"; }), /manifest\.json \/files\/1\/path: "\.\.\/progress\.json" is not a plain relative path/);
  });

  it("a symbolic link in the bundle", async () => {
    const dir = copyBundle(csv);
    fs.symlinkSync("/etc/hostname", path.join(dir, "host.txt"));
    await expectRejected(dir, /^host\.txt: is a symbolic link/);
  });

  it("series file not listed, or under the wrong encoding", async () => {
    await expectRejected(manifestCase((m) => { m.series.file = "other.csv"; }), /manifest\.json \/series\/file: "other\.csv" is not among the listed files/);
    await expectRejected(manifestCase((m) => { m.series.encoding = "f64le"; }), /manifest\.json \/series\/file: "series\.csv" does not end in \.f64le/);
    await expectRejected(manifestCase((m) => { m.series.encoding = "tsv"; }), /manifest\.json.*\/series\/encoding must be equal to one of the allowed values/);
  });

  it("f64le truncated: byte length not a multiple of 8 × columns", async () => {
    const dir = copyBundle(f64);
    const file = path.join(dir, "series.f64le");
    fs.truncateSync(file, fs.statSync(file).size - 12);
    fixHashes(dir);
    await expectRejected(dir, /^series\.f64le row 200: is truncated: 7988 bytes is not a multiple of 40 \(5 columns × 8 bytes\)/);
  });

  it("f64le with a NaN and with a row too few", async () => {
    const nan = copyBundle(f64);
    const file = path.join(nan, "series.f64le");
    const raw = fs.readFileSync(file);
    raw.writeDoubleLE(Number.NaN, (16 * 5 + 2) * 8);
    fs.writeFileSync(file, raw);
    fixHashes(nan);
    await expectRejected(nan, /^series\.f64le row 17 column "absM": value NaN at byte 656 is not finite/);
    const short = copyBundle(f64);
    fs.truncateSync(path.join(short, "series.f64le"), 199 * 40);
    fixHashes(short);
    await expectRejected(short, /^series\.f64le: has 199 rows \(7960 bytes\), manifest\.json \/series\/rows says 200/);
  });

  it("leaves nothing behind: after every refusal the good bundle still imports", async () => {
    const counts = await tableCounts();
    expect(counts).toMatchObject({ series: 0, estimates: 0, run_artifacts: 0, artifacts: 0, accepted: 0 });
    expect(counts.rejected).toBeGreaterThanOrEqual(30);
    const ok = await importBundle({ runId: runs[0].id, dir: copyBundle(csv), source: "cluster" });
    expect(ok.status).toBe("imported");
  });

  it("a refused bundle that is fixed and sent again imports, its rejected row turned accepted", async () => {
    // Same manifest bytes, series damaged in transit first: the retry must not be blocked by the hash.
    const broken = copyBundle(sampleBundle(runs[1], PARAMS, { measurements: 100 }));
    const good = copyBundle(broken);
    fs.truncateSync(path.join(broken, "series.csv"), 100);
    const err = await importBundle({ runId: runs[1].id, dir: broken, source: "cluster" }).catch((e) => e);
    expect(err.code).toBe("invalid");
    const ok = await importBundle({ runId: runs[1].id, dir: good, source: "cluster" });
    expect(ok).toMatchObject({ status: "imported", importId: err.details.importId });
    expect(await db().Import.findByPk(ok.importId)).toMatchObject({ state: "accepted", rejectReason: null });
  });

  it("a second, different bundle for a run that already has one is refused as a conflict", async () => {
    const other = sampleBundle(runs[0], PARAMS, { measurements: 150 });
    await expectRejected(copyBundle(other), /already has an imported bundle/, "conflict");
  });
});

describe("where a rejection is recorded", () => {
  it("against the named run, even when the manifest itself is unusable", async () => {
    const dir = copyBundle(csv);
    fs.rmSync(path.join(dir, "manifest.json"));
    fs.symlinkSync(path.join(csv, "manifest.json"), path.join(dir, "manifest.json"));
    const err = await importBundle({ runId: runs[1].id, dir, source: "cluster" }).catch((e) => e);
    expect(err.message).toMatch(/^manifest\.json: is not a regular file/);
    expect(await db().Import.findByPk(err.details.importId)).toMatchObject({ state: "rejected", runId: runs[1].id });
  });

  it("a bundle whose manifest names an unknown run, imported without a run id", async () => {
    const dir = manifestCase((m) => { m.runId = "9d3f0c1e-0000-4000-8000-000000000001"; });
    const err = await importBundle({ runId: null, dir, source: "upload" }).catch((e) => e);
    expect(err.message).toMatch(/manifest\.json \/runId: "9d3f0c1e-0000-4000-8000-000000000001" is not a known run/);
    expect(await db().Import.findByPk(err.details.importId)).toMatchObject({ state: "rejected", runId: null, source: "upload" });
  });
});

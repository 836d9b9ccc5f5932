// Verify a frozen manuscript through its queue job: everything verified; then one archived file tampered on
// disk → the report names that file and only the exhibit that depends on it; a changed series value → the estimate.
import fs from "node:fs";
import pino from "pino";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { verifyManuscriptJob } from "@/broker/jobs/verify-manuscript";
import { loadIdentity, type Identity } from "@/lib/auth/identity";
import { addExhibit, createManuscript } from "@/lib/manuscripts/edit-manuscript";
import { freezeManuscript } from "@/lib/manuscripts/freeze-manuscript";
import { requestVerification, verificationStatus, VERIFY_QUEUE, type ExhibitReport } from "@/lib/manuscripts/verify-manuscript";
import { stopBoss } from "@/lib/queue/boss";
import { resolveArchived } from "@/lib/storage/archive-path";
import { db, type Manuscript } from "@/models";
import { useTestDatabase } from "@/tests/support/db";
import { buildFixture, cleanupTemp, POINTS, type ProvFixture } from "./fixture";

useTestDatabase();
let fx: ProvFixture;
let pi: Identity;
let ms: Manuscript;
const restore: { file: string; bytes: Buffer }[] = [];
const audit = { actorId: null, ip: null, requestId: "test" };
const log = pino({ level: "silent" });

beforeAll(async () => {
  fx = await buildFixture();
  pi = (await loadIdentity(fx.pi.id, "session"))!;
  ms = await createManuscript(audit, pi, { groupId: fx.group.id, title: "Verification" });
  // Fig. 1 rests on all four runs; Table 1 only on the two runs at the second temperature.
  await addExhibit(audit, pi, ms.id, { label: "Fig. 1", kind: "figure", query: { ensembleIds: [fx.ensemble.id], observable: "e", scope: "point" } });
  await addExhibit(audit, pi, ms.id, { label: "Table 1", kind: "table", query: { ensembleIds: [fx.ensemble.id], observable: "absM", scope: "run", params: [{ name: "T", min: 2.5 }] } });
  await freezeManuscript(audit, pi, ms.id);
}, 120_000);
afterAll(async () => {
  for (const r of restore) fs.writeFileSync(r.file, r.bytes); // the archive is shared by the files of this run of the suite
  await db().sequelize.query(`ALTER TABLE series ENABLE TRIGGER series_frozen`).catch(() => undefined);
  await stopBoss();
  cleanupTemp();
});

/** Request a verification, take its job off the queue as the broker would, and run the job's handler. */
async function verify(): Promise<{ id: string; exhibits: Map<string, ExhibitReport> }> {
  const id = await requestVerification(audit, pi, ms.id);
  const [job] = (await db().sequelize.query(`SELECT id, data FROM pgboss.job WHERE name = $1 AND data->>'verificationId' = $2`, { bind: [VERIFY_QUEUE, id], type: "SELECT" })) as { id: string; data: { verificationId: string } }[];
  expect(job, "the verification was queued").toBeDefined();
  expect((await verificationStatus({ id }))!.state).toBe("queued");
  await verifyManuscriptJob.handle(job.data, { jobId: job.id, retryCount: 0, log });
  const status = (await verificationStatus({ id }))!;
  expect(status.itemsDone).toBe(status.itemsTotal);
  return { id, exhibits: new Map(status.report!.exhibits.map((x) => [x.label, x])) };
}

describe("verify-manuscript", () => {
  it("verifies an untouched manuscript: every file re-hashed, every estimate recomputed equal", async () => {
    const { id, exhibits } = await verify();
    const status = (await verificationStatus({ id }))!;
    expect(status.state).toBe("verified");
    const files = await db().RunArtifact.count({ where: { runId: fx.runs.map((r) => r.id) } });
    expect(status.report!.filesChecked).toBe(files);
    // 2 point estimates of e + their 4 run inputs, and 2 run estimates of absM
    expect(status.report!.estimatesChecked).toBe(8);
    expect([...exhibits.values()].map((x) => x.status)).toEqual(["verified", "verified"]);
  });

  it("names a tampered archived file and exactly the exhibits resting on it", async () => {
    const run = fx.runs.find((r) => r.pointId === fx.runs[0].pointId)!;
    const ra = (await db().RunArtifact.findOne({ where: { runId: run.id, role: "series" }, include: [{ model: db().Artifact, as: "artifact" }] }))!;
    const file = resolveArchived(ra.artifact!.storagePath);
    const bytes = fs.readFileSync(file);
    restore.push({ file, bytes });
    fs.chmodSync(file, 0o644);
    fs.writeFileSync(file, Buffer.concat([bytes.subarray(0, bytes.length - 2), Buffer.from("9\n")]));
    const { id, exhibits } = await verify();
    expect((await verificationStatus({ id }))!.state).toBe("differs");
    expect(exhibits.get("Fig. 1")!.status).toBe("differs");
    expect(exhibits.get("Fig. 1")!.files).toEqual([expect.objectContaining({ sha256: ra.artifactSha256, path: ra.path, runId: run.id, problem: expect.stringMatching(/content changed/) })]);
    expect(exhibits.get("Table 1")!.status).toBe("verified");
    expect(POINTS[0].T).toBeLessThan(2.5); // the tampered run is outside Table 1's range by construction
    fs.writeFileSync(file, bytes);
  });

  it("names the estimate when its stored series no longer gives the frozen value", async () => {
    const run = fx.runs.find((r) => r.pointId !== fx.runs[0].pointId)!;
    // Only by switching the freeze trigger off (as the table owner) can a stored value change at all.
    await db().sequelize.query(`ALTER TABLE series DISABLE TRIGGER series_frozen`);
    await db().sequelize.query(`UPDATE series SET "values"[300] = "values"[300] + 1 WHERE run_id = $1 AND observable = 'absM' AND chunk_index = 0`, { bind: [run.id] });
    await db().sequelize.query(`ALTER TABLE series ENABLE TRIGGER series_frozen`);
    const { exhibits } = await verify();
    const table = exhibits.get("Table 1")!;
    expect(table.status).toBe("differs");
    expect(table.files).toEqual([]);
    expect(table.estimates.map((d) => [d.runId, d.observable, d.field])).toContainEqual([run.id, "absM", "mean"]);
    expect(exhibits.get("Fig. 1")!.status).toBe("verified"); // e of that run is untouched
  });
});

// Freezing a manuscript built from a real ensemble: snapshots with hashes, and the database itself refusing
// changes beneath it (through the ORM and raw SQL); re-analysis beside frozen versions; unfreeze by the PI, audited.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { loadIdentity, type Identity } from "@/lib/auth/identity";
import { writeEstimateVersions } from "@/lib/estimates/write-estimates";
import { addCollaborator, addExhibit, createManuscript } from "@/lib/manuscripts/edit-manuscript";
import { freezeManuscript, isRunFrozen, snapshotHash, unfreezeManuscript } from "@/lib/manuscripts/freeze-manuscript";
import { provForManuscript, type ExhibitSnapshot } from "@/lib/provenance/prov-for";
import { provJsonSchema } from "@/lib/provenance/prov-json-schema";
import { ajv } from "@/lib/validation";
import { db, type Manuscript } from "@/models";
import { useTestDatabase } from "@/tests/support/db";
import { refusal, SQLSTATE } from "@/tests/integration/schema/pg-error";
import { buildFixture, cleanupTemp, type ProvFixture } from "./fixture";

useTestDatabase();
let fx: ProvFixture;
let pi: Identity, researcher: Identity, viewer: Identity;
let ms: Manuscript;
const audit = (who: Identity) => ({ actorId: who.userId, ip: "127.0.0.1", requestId: "test" });
const sql = (q: string, bind: unknown[] = []) => db().sequelize.query(q, { bind });

beforeAll(async () => {
  fx = await buildFixture();
  [pi, researcher, viewer] = await Promise.all([fx.pi, fx.researcher, fx.viewer].map(async (u) => (await loadIdentity(u.id, "session"))!));
  ms = await createManuscript(audit(pi), pi, { groupId: fx.group.id, title: "Critical behaviour on small lattices", journal: "Phys. Rev. E" });
}, 120_000);
afterAll(cleanupTemp);

describe("drafting", () => {
  it("a viewer cannot create a manuscript; a collaborator the PI adds can add exhibits, an outsider cannot", async () => {
    await expect(createManuscript(audit(viewer), viewer, { groupId: fx.group.id, title: "x" })).rejects.toMatchObject({ code: "forbidden" });
    const query = { ensembleIds: [fx.ensemble.id], observable: "e", scope: "point" as const, x: "T" };
    await expect(addExhibit(audit(researcher), researcher, ms.id, { label: "Fig. 1", kind: "figure", query })).rejects.toMatchObject({ code: "forbidden" });
    await addCollaborator(audit(pi), pi, ms.id, researcher.userId);
    await addExhibit(audit(researcher), researcher, ms.id, { label: "Fig. 1", caption: "Energy per site against T", kind: "figure", query });
    await addExhibit(audit(pi), pi, ms.id, { label: "Table 1", kind: "table", query: { ensembleIds: [fx.ensemble.id], observable: "absM", scope: "run" } });
    await expect(addExhibit(audit(pi), pi, ms.id, { label: "Fig. 2", kind: "figure", query: { observable: "e; drop table" } as never })).rejects.toMatchObject({ code: "invalid" });
  });
});

describe("freeze", () => {
  let snaps: Map<string, ExhibitSnapshot>;
  beforeAll(async () => {
    await expect(freezeManuscript(audit(researcher), researcher, ms.id)).rejects.toMatchObject({ code: "forbidden" });
    await freezeManuscript(audit(pi), pi, ms.id);
    const exhibits = await db().Exhibit.findAll({ where: { manuscriptId: ms.id } });
    snaps = new Map(exhibits.map((x) => [x.label, x.snapshot as unknown as ExhibitSnapshot]));
    for (const x of exhibits) expect(x.snapshotHash).toBe(snapshotHash(x.snapshot as unknown as ExhibitSnapshot));
  });

  it("snapshots the exact estimates, their inputs, runs and every archived file with its hash", async () => {
    const fig = snaps.get("Fig. 1")!;
    const current = await db().Estimate.findAll({ where: { ensembleId: fx.ensemble.id, scope: "point", observable: "e", isCurrent: true } });
    expect(fig.estimates.map((e) => e.id).sort()).toEqual(current.map((e) => e.id).sort());
    for (const e of fig.estimates) {
      const row = current.find((c) => c.id === e.id)!;
      expect(e).toMatchObject({ mean: row.mean, error: row.error, analysisVersion: row.analysisVersion });
      expect(e.inputs).toHaveLength(2); // both replicas
    }
    expect(fig.estimates.flatMap((e) => e.inputs)).toContain(fx.manualEstimateId);
    expect(fig.runs.sort()).toEqual(fx.runs.map((r) => r.id).sort());
    const files = await db().RunArtifact.count({ where: { runId: fx.runs.map((r) => r.id) } });
    expect(fig.files).toHaveLength(files);
    expect(snaps.get("Table 1")!.estimates).toHaveLength(4); // absM of four runs
  });

  it("refuses update and delete of a frozen estimate through the ORM and raw SQL", async () => {
    const frozen = await db().Estimate.findByPk(snaps.get("Fig. 1")!.estimates[0].id);
    expect((await refusal(frozen!.update({ mean: 0 }))).code).toBe(SQLSTATE.raised);
    expect((await refusal(frozen!.destroy())).code).toBe(SQLSTATE.raised);
    expect((await refusal(sql(`UPDATE estimates SET error = error * 2 WHERE id = $1`, [frozen!.id]))).message).toMatch(/frozen by a manuscript/);
    expect((await refusal(sql(`DELETE FROM estimates WHERE id = $1`, [fx.manualEstimateId]))).code).toBe(SQLSTATE.raised);
    expect((await refusal(sql(`TRUNCATE estimates CASCADE`))).code).toBe(SQLSTATE.raised);
  });

  it("refuses changes to its runs, series, run files and archived files (purge), and cascades from the ensemble", async () => {
    const run = await db().Run.findByPk(fx.runs[1].id);
    expect((await refusal(run!.update({ seed: "1" }))).code).toBe(SQLSTATE.raised);
    expect((await refusal(sql(`UPDATE runs SET exit_code = 1 WHERE id = $1`, [run!.id]))).code).toBe(SQLSTATE.raised);
    expect((await refusal(sql(`DELETE FROM runs WHERE id = $1`, [run!.id]))).code).toBe(SQLSTATE.raised);
    expect((await refusal(sql(`DELETE FROM ensembles WHERE id = $1`, [fx.ensemble.id]))).code).toBe(SQLSTATE.raised);
    expect((await refusal(sql(`UPDATE series SET "values" = array[0]::float8[] WHERE run_id = $1`, [run!.id]))).code).toBe(SQLSTATE.raised);
    expect((await refusal(sql(`DELETE FROM run_artifacts WHERE run_id = $1`, [run!.id]))).code).toBe(SQLSTATE.raised);
    const sha = snaps.get("Table 1")!.files[0].sha256;
    expect((await refusal(db().Artifact.destroy({ where: { sha256: sha } }))).message).toContain(sha);
    expect((await refusal(sql(`UPDATE manuscripts SET title = 'edited' WHERE id = $1`, [ms.id]))).code).toBe(SQLSTATE.raised);
    expect((await refusal(sql(`UPDATE exhibits SET caption = 'edited' WHERE manuscript_id = $1`, [ms.id]))).code).toBe(SQLSTATE.raised);
    expect((await refusal(sql(`DELETE FROM provenance.frozen_items WHERE manuscript_id = $1`, [ms.id]))).code).toBe(SQLSTATE.raised);
    expect(await isRunFrozen(run!.id)).toBe(true);
  });

  it("lets re-analysis store a new version beside the frozen one (isCurrent flips, nothing else)", async () => {
    const old = (await db().Estimate.findByPk(fx.manualEstimateId))!;
    const [fresh] = await db().sequelize.transaction((transaction) => writeEstimateVersions("run", old.runId!, [{
      pointId: old.pointId, ensembleId: old.ensembleId, observable: "e", mean: old.mean + 1e-3, error: old.error, n: old.n, method: old.method,
      analysisVersion: old.analysisVersion, thermCut: old.thermCut + 1, chosenById: pi.userId, chosenAt: new Date(),
    }], transaction));
    const after = (await db().Estimate.findByPk(old.id))!;
    expect(fresh.version).toBe(old.version + 1);
    expect(after).toMatchObject({ isCurrent: false, mean: old.mean, error: old.error, version: old.version });
  });

  it("exports a manuscript PROV-JSON whose exhibits derive from exactly the frozen estimates", async () => {
    const doc = await provForManuscript(ms.id);
    expect(ajv.validate(provJsonSchema, doc)).toBe(true);
    const derived = (label: string) => {
      const id = Object.entries(doc.entity).find(([, a]) => a["prov:label"] === label)![0];
      return Object.values(doc.wasDerivedFrom).filter((r) => r["prov:generatedEntity"] === id).map((r) => String(r["prov:usedEntity"]).slice(4)).sort();
    };
    expect(derived("Fig. 1")).toEqual(snaps.get("Fig. 1")!.estimates.map((e) => e.id).sort());
    expect(derived("Table 1")).toEqual(snaps.get("Table 1")!.estimates.map((e) => e.id).sort());
    expect(Object.keys(doc.activity).filter((k) => /^run:[^/]+$/.test(k))).toHaveLength(4);
    expect(Object.values(doc.wasAssociatedWith).some((r) => r["prov:activity"] === `ms:${ms.id}/freeze` && r["prov:agent"] === `user:${pi.userId}`)).toBe(true);
  });
});

describe("unfreeze", () => {
  it("needs the PI and a reason, is audited, and releases the rows", async () => {
    await expect(unfreezeManuscript(audit(researcher), researcher, ms.id, "typo")).rejects.toMatchObject({ code: "forbidden" });
    await expect(unfreezeManuscript(audit(pi), pi, ms.id, " ")).rejects.toMatchObject({ code: "invalid" });
    await unfreezeManuscript(audit(pi), pi, ms.id, "referee asked for a larger lattice");
    const entry = await db().AuditEntry.findOne({ where: { action: "manuscript.unfreeze", targetId: ms.id } });
    expect(entry!.detail).toMatchObject({ reason: "referee asked for a larger lattice" });
    expect(Object.keys(entry!.detail.releasedSnapshotHashes as object).sort()).toEqual(["Fig. 1", "Table 1"]);
    expect(await isRunFrozen(fx.runs[1].id)).toBe(false);
    await sql(`UPDATE runs SET exit_code = 0 WHERE id = $1`, [fx.runs[1].id]); // accepted again
    expect(await db().AuditEntry.count({ where: { action: "manuscript.freeze", targetId: ms.id } })).toBe(1);
  });
});

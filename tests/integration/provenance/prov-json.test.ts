// PROV-JSON of a run and of an ensemble built from real imported bundles: valid against our schema written
// from the W3C member submission "PROV-JSON Serialization" (Huynh et al., 2013), with the expected counts and edges.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { ajv } from "@/lib/validation";
import { provJsonSchema, PROV_JSON_SOURCE } from "@/lib/provenance/prov-json-schema";
import { provForEnsemble, provForRun } from "@/lib/provenance/prov-for";
import { provListing, provListingCsv } from "@/lib/provenance/listing";
import type { ProvDocument } from "@/lib/provenance/prov-document";
import { db } from "@/models";
import { useTestDatabase } from "@/tests/support/db";
import { buildFixture, cleanupTemp, MANUAL_CUT, type ProvFixture } from "./fixture";

useTestDatabase();
let fx: ProvFixture;
beforeAll(async () => { fx = await buildFixture(); }, 120_000);
afterAll(cleanupTemp);

const validateProv = ajv.compile(provJsonSchema);
const edges = (doc: ProvDocument, kind: keyof ProvDocument) => Object.values(doc[kind] as Record<string, Record<string, unknown>>);
const has = (doc: ProvDocument, kind: keyof ProvDocument, match: Record<string, unknown>) =>
  edges(doc, kind).some((r) => Object.entries(match).every(([k, v]) => r[k] === v));
const count = async (sql: string, bind: unknown[]) => Number(((await db().sequelize.query(sql, { bind, type: "SELECT" })) as { n: string }[])[0].n);

describe(`PROV-JSON schema from ${PROV_JSON_SOURCE}`, () => {
  it("refuses documents that break the submission's rules (so validity below means something)", () => {
    expect(validateProv({ entity: { "no-prefix": {} } })).toBe(false); // identifiers are qualified names
    expect(validateProv({ used: { "_:u1": { "prov:entity": "ex:a" } } })).toBe(false); // used needs prov:activity
    expect(validateProv({ activity: { "ex:a": { "prov:startTime": "yesterday" } } })).toBe(false); // xsd:dateTime
    expect(validateProv({ entity: { "ex:a": { "ex:v": { $: "1" } } } })).toBe(false); // a typed literal needs its type
    expect(validateProv({ wasDerivedFrom: { "_:d": { "prov:generatedEntity": "ex:a", "prov:usedEntity": "ex:b" } }, entity: { "ex:a": { "ex:v": { $: "1", type: "xsd:int" } } } })).toBe(true);
  });
});

describe("provForRun", () => {
  let doc: ProvDocument;
  let run: ProvFixture["runs"][number];
  beforeAll(async () => { run = fx.runs[0]; doc = await provForRun(run.id); });

  it("validates against the PROV-JSON schema", () => {
    expect(validateProv(doc), JSON.stringify(validateProv.errors?.slice(0, 3))).toBe(true);
  });

  it("has one entity per archived file, series and estimate version, plus run.json, spec and sampler code", async () => {
    const files = await count(`SELECT count(*) AS n FROM run_artifacts WHERE run_id = $1`, [run.id]);
    const series = await count(`SELECT count(DISTINCT observable) AS n FROM series WHERE run_id = $1`, [run.id]);
    const estimates = await count(`SELECT count(*) AS n FROM estimates WHERE run_id = $1`, [run.id]);
    expect(files).toBeGreaterThanOrEqual(2); // manifest and series at least
    expect(estimates).toBe(8); // 4 primary + 3 derived observables, plus the manual version of e
    const kinds = (prefix: string) => Object.keys(doc.entity).filter((k) => k.startsWith(prefix)).length;
    expect(kinds("file:")).toBe(files);
    expect(Object.keys(doc.entity).filter((k) => k.startsWith("series:")).length).toBe(series);
    expect(Object.keys(doc.entity).filter((k) => /^est:[^/]+$/.test(k)).length).toBe(estimates);
    expect(Object.keys(doc.entity).length).toBe(files + series + estimates + 3);
    // the run, its import, one derivation per estimate
    expect(Object.keys(doc.activity).length).toBe(2 + estimates);
    // submitter (researcher), the PI who chose the manual cut, the sampler as software agent
    expect(Object.keys(doc.agent).sort()).toEqual([`sampler:ising2d/1.0.0`, `user:${fx.pi.id}`, `user:${fx.researcher.id}`].sort());
    expect(doc.agent["sampler:ising2d/1.0.0"]["prov:type"]).toEqual({ $: "prov:SoftwareAgent", type: "xsd:QName" });
  });

  it("names the run on its cluster with its times, seed and import version, and links who and what", async () => {
    const act = doc.activity[`run:${run.id}`];
    const cluster = await db().Cluster.findByPk((await db().Ensemble.findByPk(run.ensembleId))!.clusterId!);
    expect(act).toMatchObject({ "ergodex:cluster": cluster!.name, "ergodex:seed": run.seed, "prov:startTime": run.startedAt!.toISOString(), "prov:endTime": run.finishedAt!.toISOString() });
    const imp = await db().Import.findOne({ where: { runId: run.id } });
    expect(doc.activity[`imp:${imp!.id}`]["ergodex:importerVersion"]).toBe(imp!.importerVersion);
    expect(has(doc, "used", { "prov:activity": `run:${run.id}`, "prov:entity": `run:${run.id}/run.json` })).toBe(true);
    expect(has(doc, "wasAssociatedWith", { "prov:activity": `run:${run.id}`, "prov:agent": "sampler:ising2d/1.0.0" })).toBe(true);
    expect(has(doc, "wasAssociatedWith", { "prov:activity": `run:${run.id}`, "prov:agent": `user:${fx.researcher.id}`, "prov:role": "ergodex:submitter" })).toBe(true);
    const seriesFile = await db().RunArtifact.findOne({ where: { runId: run.id, role: "series" } });
    expect(has(doc, "wasGeneratedBy", { "prov:entity": `file:${seriesFile!.artifactSha256}`, "prov:activity": `run:${run.id}` })).toBe(true);
    expect(has(doc, "wasDerivedFrom", { "prov:generatedEntity": `series:${run.id}/e`, "prov:usedEntity": `file:${seriesFile!.artifactSha256}` })).toBe(true);
    expect(has(doc, "wasAttributedTo", { "prov:entity": `file:${seriesFile!.artifactSha256}`, "prov:agent": `user:${fx.researcher.id}` })).toBe(true);
  });

  it("records the manual cut, who chose it, and derives estimates from their series (derived ones from their inputs)", async () => {
    const id = fx.manualEstimateId;
    expect(doc.activity[`est:${id}/derivation`]).toMatchObject({ "ergodex:thermCut": MANUAL_CUT, "ergodex:cutChoice": "manual" });
    expect(has(doc, "wasAssociatedWith", { "prov:activity": `est:${id}/derivation`, "prov:agent": `user:${fx.pi.id}`, "prov:role": "ergodex:choseCut" })).toBe(true);
    expect(has(doc, "wasDerivedFrom", { "prov:generatedEntity": `est:${id}`, "prov:usedEntity": `series:${run.id}/e` })).toBe(true);
    const chi = await db().Estimate.findOne({ where: { runId: run.id, observable: "chi" } });
    const chiFrom = edges(doc, "wasDerivedFrom").filter((r) => r["prov:generatedEntity"] === `est:${chi!.id}`).map((r) => r["prov:usedEntity"]).sort();
    expect(chiFrom).toEqual([`series:${run.id}/absM`, `series:${run.id}/m2`]);
  });
});

describe("provForEnsemble", () => {
  let doc: ProvDocument;
  beforeAll(async () => { doc = await provForEnsemble(fx.ensemble.id); });

  it("validates, holds all four runs, and derives each point estimate from its two replicas' run estimates", async () => {
    expect(validateProv(doc), JSON.stringify(validateProv.errors?.slice(0, 3))).toBe(true);
    expect(Object.keys(doc.activity).filter((k) => /^run:[^/]+$/.test(k)).length).toBe(4);
    const points = await db().Estimate.findAll({ where: { ensembleId: fx.ensemble.id, scope: "point" } });
    expect(points.filter((p) => p.observable === "e").length).toBeGreaterThanOrEqual(2);
    for (const p of points) {
      const from = edges(doc, "wasDerivedFrom").filter((r) => r["prov:generatedEntity"] === `est:${p.id}`);
      // a replica whose series was too short for an observable has no run estimate of it to combine
      const replicas = await count(`SELECT count(DISTINCT run_id) AS n FROM estimates WHERE scope = 'run' AND point_id = $1 AND observable = $2`, [p.pointId, p.observable]);
      expect(replicas).toBeGreaterThanOrEqual(1);
      expect(from.length, `${p.observable} at ${JSON.stringify(p.params)}`).toBe(replicas);
    }
    // e at the first point combines the manual version of the first run, not the automatic one it replaced
    const ePoint = points.find((p) => p.observable === "e" && p.pointId === fx.runs[0].pointId && p.isCurrent)!;
    expect(has(doc, "wasDerivedFrom", { "prov:generatedEntity": `est:${ePoint.id}`, "prov:usedEntity": `est:${fx.manualEstimateId}` })).toBe(true);
  });

  it("lists the same document plainly: one row per element and relation, CSV with a header", () => {
    const rows = provListing(doc);
    const relations = ["used", "wasGeneratedBy", "wasAssociatedWith", "wasDerivedFrom", "wasAttributedTo"] as const;
    const expected = Object.keys(doc.entity).length + Object.keys(doc.activity).length + Object.keys(doc.agent).length
      + relations.reduce((a, k) => a + Object.keys(doc[k]).length, 0);
    expect(rows.length).toBe(expected);
    const csv = provListingCsv(doc).trimEnd().split("\n");
    expect(csv[0]).toBe("kind,id,type,label,from,to,details");
    expect(csv.length).toBe(expected + 1);
  });
});

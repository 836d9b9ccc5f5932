// The provenance pages' model of a real run's PROV-JSON: the graph's layering follows what happened (inputs → run →
// files → import → series → derivation → estimate), every node that has a page links to it, and the readable chain
// names the manual cut's chooser; plus the byte locator of the replay comparison on a real series file.
import fs from "node:fs";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { provForEnsemble, provForRun } from "@/lib/provenance/prov-for";
import { provChain } from "@/lib/provenance/prov-chain";
import { ancestry } from "@/lib/provenance/ancestry";
import { provGraph, type ProvGraph } from "@/lib/provenance/prov-graph";
import { firstDifferingByte, locateRow } from "@/lib/provenance/replay/compare-files";
import { resolveArchived } from "@/lib/storage/archive-path";
import { db } from "@/models";
import { useTestDatabase } from "@/tests/support/db";
import { buildFixture, cleanupTemp, type ProvFixture } from "./fixture";

useTestDatabase();
let fx: ProvFixture;
let graph: ProvGraph;

beforeAll(async () => {
  fx = await buildFixture();
  graph = provGraph(await provForRun(fx.runs[0].id), { people: true });
}, 120_000);
afterAll(() => cleanupTemp());

const layerOf = (id: string) => graph.nodes.find((n) => n.id === id)!.layer;

describe("provenance graph and chain", () => {
  it("lays a run out in the order things happened", async () => {
    const run = fx.runs[0];
    const files = await db().RunArtifact.findAll({ where: { runId: run.id } });
    const series = files.find((f) => f.role === "series")!;
    const imp = graph.nodes.find((n) => n.id.startsWith("imp:"))!;
    // derivation activities are drawn as part of their estimates (the estimate's page is theirs)
    expect(graph.nodes.filter((n) => n.id.endsWith("/derivation"))).toEqual([]);
    const chain = [`run:${run.id}/run.json`, `run:${run.id}`, `file:${series.artifactSha256}`, imp.id, `series:${run.id}/e`, `est:${fx.manualEstimateId}`];
    const layers = chain.map(layerOf);
    expect(layers, chain.join(" → ")).toEqual([...layers].sort((a, b) => a - b));
    expect(new Set(layers).size).toBe(chain.length); // strictly increasing: each step one layer right of its cause
    // who chose the manual cut points at the estimate; its label is in concise notation
    expect(graph.edges).toContainEqual({ from: `user:${fx.pi.id}`, to: `est:${fx.manualEstimateId}`, relation: "wasAssociatedWith", role: "ergodex:choseCut" });
    expect(graph.nodes.find((n) => n.id === `est:${fx.manualEstimateId}`)!.label).toMatch(/^e = −?\d+\.\d+\(\d+\)$/);
    expect(graph.compact).toBe(false);
    // no two nodes share a cell
    expect(new Set(graph.nodes.map((n) => `${n.layer}/${n.row}`)).size).toBe(graph.nodes.length);
  });

  it("links every node that has a page: run, estimate, series analysis, archived file download, person's audit trail", () => {
    const run = fx.runs[0].id;
    const href = (id: string) => graph.nodes.find((n) => n.id === id)?.href;
    expect(href(`run:${run}`)).toBe(`/runs/${run}`);
    expect(href(`est:${fx.manualEstimateId}`)).toBe(`/provenance/estimates/${fx.manualEstimateId}`);
    expect(href(`series:${run}/e`)).toBe(`/runs/${run}/analysis?observable=e`);
    expect(href(`user:${fx.pi.id}`)).toBe(`/audit?actor=${fx.pi.id}`);
    const files = graph.nodes.filter((n) => n.kind === "file");
    expect(files.length).toBeGreaterThanOrEqual(3); // manifest, series, progress
    for (const f of files) expect(f.href).toBe(`/api/v1/provenance/runs/${run}/files/${f.id.slice("file:".length)}`);
    const unlinked = graph.nodes.filter((n) => !n.href).map((n) => n.kind);
    expect([...new Set(unlinked)].sort()).toEqual(["input", "software"]); // the sampler's code and the sampler as agent have no page of their own
  });

  it("the chain starts with the run and names who chose the manual cut, and when", async () => {
    const steps = provChain(await provForRun(fx.runs[0].id), { people: true });
    expect(steps[0].id).toBe(`run:${fx.runs[0].id}`);
    expect(steps[0].agents.map((a) => a.role).sort()).toEqual(["sampler", "submitter"]);
    expect(steps[0].used.map((u) => u.id)).toContain(`run:${fx.runs[0].id}/run.json`);
    const manual = steps.find((s) => s.id === `est:${fx.manualEstimateId}/derivation`)!;
    expect(manual.agents).toEqual([expect.objectContaining({ id: `user:${fx.pi.id}`, label: fx.pi.name, role: "choseCut" })]);
    expect(Object.fromEntries(manual.facts)).toMatchObject({ "thermalisation cut": "37", "cut chosen": "manual" });
    expect(Object.fromEntries(manual.facts)["cut chosen at"]).toMatch(/^\d{4}-\d{2}-\d{2}T/);
  });

  it("an estimate's page shows what it rests on: its series, the import, the run and its inputs, who chose the cut; nothing else", async () => {
    const run = fx.runs[0].id;
    const doc = ancestry(await provForRun(run), `est:${fx.manualEstimateId}`);
    expect(Object.keys(doc.entity).filter((k) => k.startsWith("est:"))).toEqual([`est:${fx.manualEstimateId}`]);
    expect(Object.keys(doc.entity).filter((k) => k.startsWith("series:"))).toEqual([`series:${run}/e`]);
    expect(Object.keys(doc.activity)).toHaveLength(3);
    expect(Object.keys(doc.activity)).toEqual(expect.arrayContaining([`est:${fx.manualEstimateId}/derivation`, expect.stringMatching(/^imp:/), `run:${run}`]));
    expect(Object.keys(doc.entity)).toEqual(expect.arrayContaining([`run:${run}/run.json`, `ens:${fx.ensemble.id}/spec`]));
    expect(Object.keys(doc.agent)).toEqual(expect.arrayContaining([`user:${fx.pi.id}`, `user:${fx.researcher.id}`]));
    // every relation kept has both ends in the cut-down document
    const ids = new Set([...Object.keys(doc.entity), ...Object.keys(doc.activity), ...Object.keys(doc.agent)]);
    for (const rel of ["used", "wasGeneratedBy", "wasAssociatedWith", "wasDerivedFrom", "wasAttributedTo"] as const) {
      for (const r of Object.values(doc[rel])) for (const v of Object.values(r)) if (typeof v === "string" && /^(run|est|series|file|imp|user|sampler|ens):/.test(v)) expect(ids.has(v), v).toBe(true);
    }
  });

  it("compacts a whole ensemble: runs and point estimates, each point estimate tied to its two replicas", async () => {
    const doc = await provForEnsemble(fx.ensemble.id);
    const g = provGraph(doc, { maxNodes: 40 });
    expect(g.compact).toBe(true);
    const points = g.nodes.filter((n) => n.kind === "estimate");
    expect(points.length).toBeGreaterThan(0);
    expect(g.nodes.filter((n) => n.kind === "file" || n.kind === "series")).toEqual([]);
    // Which runs each point estimate rests on, read from the full document: its derivation used run estimates,
    // each derived from a series named series:<run>/<observable>.
    const q = (v: unknown) => (typeof v === "object" && v ? (v as { $: string }).$ : String(v));
    const runsBeneath = (est: string) => {
      const used = Object.values(doc.used).filter((u) => q(u["prov:activity"]) === `${est}/derivation`).map((u) => q(u["prov:entity"]));
      const series = Object.values(doc.wasDerivedFrom).filter((d) => used.includes(q(d["prov:generatedEntity"])) && q(d["prov:usedEntity"]).startsWith("series:"));
      return [...new Set(series.map((d) => `run:${q(d["prov:usedEntity"]).slice("series:".length).split("/")[0]}`))].sort();
    };
    const drawn = (est: string) => g.edges.filter((e) => e.to === est && e.from.startsWith("run:")).map((e) => e.from).sort();
    for (const p of points) expect(drawn(p.id), `${p.label}`).toEqual(runsBeneath(p.id));
    // two replicas per point: most point estimates rest on both
    expect(points.filter((p) => drawn(p.id).length === 2).length).toBeGreaterThan(points.length / 2);
  });

  it("locates a byte of a real series file: its row and that row's sweep", async () => {
    const row = await db().RunArtifact.findOne({ where: { runId: fx.runs[0].id, role: "series" } });
    const a = await db().Artifact.findByPk(row!.artifactSha256);
    const bytes = fs.readFileSync(resolveArchived(a!.storagePath));
    const lines = bytes.toString("utf8").split("\n");
    const at = lines.slice(0, 5).reduce((n, l) => n + l.length + 1, 0) + 3; // 3 bytes into data row 5
    expect(locateRow(bytes, at, "csv", 5)).toEqual({ row: 5, sweep: Number(lines[5].split(",")[0]) });
    expect(locateRow(bytes, 2, "csv", 5)).toEqual({ row: null, sweep: null }); // the header
    const copy = Buffer.from(bytes); copy[at] ^= 1;
    expect(firstDifferingByte(bytes, copy)).toBe(at);
    expect(firstDifferingByte(bytes, bytes.subarray(0, 100))).toBe(100);
    expect(firstDifferingByte(bytes, Buffer.from(bytes))).toBe(-1);
    // f64le: rows of 3 float64 columns, the sweep the row's first value
    const f = Buffer.alloc(8 * 3 * 4);
    for (let r = 0; r < 4; r++) f.writeDoubleLE(120 + r, r * 24);
    expect(locateRow(f, 2 * 24 + 9, "f64le", 3)).toEqual({ row: 3, sweep: 122 });
  });
});

import "server-only";
// PROV-JSON documents for a run, an ensemble and a manuscript.
import type { Transaction } from "sequelize";
import { modelsFor } from "@/lib/db/models-for";
import { AppError } from "@/lib/errors";
import { addEstimate, addPerson, addRun, ids } from "./add-run";
import { gatherEstimates, gatherPeople, gatherPointEstimates, gatherRuns, type EstimateFacts, type RunFacts } from "./gather";
import { dateTime, ProvBuilder, qn, type ProvDocument } from "./prov-document";

async function peopleOf(runs: RunFacts[], extra: (string | null)[], transaction?: Transaction) {
  const wanted = [...extra, ...runs.flatMap((r) => [r.ownerId, ...r.imports.map((i) => i.uploadedById), ...r.estimates.map((e) => e.chosenById)])];
  return new Map((await gatherPeople(wanted.filter((x): x is string => !!x), transaction)).map((p) => [p.id, p]));
}

/**
 * The run estimates a point estimate combined: per replica, the latest version of the same
 * observable stored no later than the point estimate (point estimates do not list their inputs).
 */
export function pointInputs(point: EstimateFacts, runs: RunFacts[]): EstimateFacts[] {
  const out: EstimateFacts[] = [];
  for (const r of runs) {
    if (r.pointId !== point.pointId) continue;
    const candidates = r.estimates.filter((e) => e.observable === point.observable && new Date(e.createdAt) <= new Date(point.createdAt));
    const latest = candidates.sort((a, b) => b.version - a.version)[0];
    if (latest) out.push(latest);
  }
  return out;
}

/** PROV-JSON of one run. */
export async function provForRun(runId: string, options: { transaction?: Transaction } = {}): Promise<ProvDocument> {
  const runs = await gatherRuns([runId], options.transaction);
  if (runs.length === 0) throw new AppError("not_found", `run ${runId} does not exist`);
  const b = new ProvBuilder();
  addRun(b, runs[0], await peopleOf(runs, [], options.transaction));
  return b.doc;
}

/** PROV-JSON of an ensemble: every run, and every point estimate derived from the run estimates. */
export async function provForEnsemble(ensembleId: string, options: { transaction?: Transaction } = {}): Promise<ProvDocument> {
  const { sequelize } = modelsFor(options.transaction);
  const runIds = ((await sequelize.query(`SELECT id FROM runs WHERE ensemble_id = $1`, { bind: [ensembleId], transaction: options.transaction, type: "SELECT" })) as { id: string }[]).map((r) => r.id);
  const exists = await modelsFor(options.transaction).Ensemble.findByPk(ensembleId, { transaction: options.transaction, attributes: ["id"] });
  if (!exists) throw new AppError("not_found", `ensemble ${ensembleId} does not exist`);
  const runs = await gatherRuns(runIds, options.transaction);
  const people = await peopleOf(runs, [], options.transaction);
  const b = new ProvBuilder();
  for (const r of runs) addRun(b, r, people);
  for (const p of await gatherPointEstimates(ensembleId, options.transaction)) {
    addEstimate(b, people, p, pointInputs(p, runs).map((e) => ids.estimate(e.id)), null);
  }
  return b.doc;
}

/** What freezing recorded for one exhibit (lib/manuscripts/freeze-manuscript.ts writes it). */
export type ExhibitSnapshot = {
  estimates: { id: string; scope: string; observable: string; mean: number; error: number; tauInt: number | null; analysisVersion: string; method: string;
    thermCut: number; window: number | null; version: number; runId: string | null; pointId: string; params: Record<string, unknown>; inputs: string[] }[];
  runs: string[];
  files: { sha256: string; path: string; runId: string; bytes: number }[];
};

/** PROV-JSON of a manuscript: its exhibits derived from the frozen estimates, and the runs beneath them. */
export async function provForManuscript(manuscriptId: string, options: { transaction?: Transaction } = {}): Promise<ProvDocument> {
  const m = modelsFor(options.transaction);
  const ms = await m.Manuscript.findByPk(manuscriptId, { transaction: options.transaction, include: [{ model: m.Exhibit, as: "exhibits" }] });
  if (!ms) throw new AppError("not_found", `manuscript ${manuscriptId} does not exist`);
  const exhibits = [...(ms.exhibits ?? [])].sort((a, b) => a.position - b.position);
  const snaps = exhibits.map((x) => x.snapshot as ExhibitSnapshot | null);
  const runs = await gatherRuns([...new Set(snaps.flatMap((s) => s?.runs ?? []))], options.transaction);
  const people = await peopleOf(runs, [ms.createdById, ms.frozenById], options.transaction);
  const b = new ProvBuilder();
  for (const r of runs) addRun(b, r, people);
  const pointIds = snaps.flatMap((s) => s?.estimates.filter((e) => e.scope === "point").map((e) => e.id) ?? []);
  const points = new Map((await gatherEstimates(pointIds, options.transaction)).map((e) => [e.id, e]));

  const msId = b.entity(`ms:${ms.id}`, { "prov:type": qn("ergodex:Manuscript"), "prov:label": ms.title, "ergodex:journal": ms.journal, "ergodex:state": ms.state });
  b.relate("wasAttributedTo", { "prov:entity": msId, "prov:agent": addPerson(b, people, ms.createdById)! });
  const freezer = addPerson(b, people, ms.frozenById);
  const freeze = ms.frozenAt ? b.activity(`ms:${ms.id}/freeze`, { "prov:type": qn("ergodex:Freeze"), "prov:startTime": dateTime(ms.frozenAt), "prov:endTime": dateTime(ms.frozenAt) }) : null;
  if (freeze && freezer) b.relate("wasAssociatedWith", { "prov:activity": freeze, "prov:agent": freezer, "prov:role": "ergodex:pi" });
  exhibits.forEach((x, i) => {
    const ex = b.entity(`exhibit:${x.id}`, { "prov:type": qn(x.kind === "figure" ? "ergodex:Figure" : "ergodex:Table"), "prov:label": x.label,
      "ergodex:caption": x.caption, "ergodex:snapshotHash": x.snapshotHash, "ergodex:query": JSON.stringify(x.query) });
    b.relate("wasDerivedFrom", { "prov:generatedEntity": msId, "prov:usedEntity": ex });
    if (freeze) b.relate("wasGeneratedBy", { "prov:entity": ex, "prov:activity": freeze, "prov:time": dateTime(ms.frozenAt) });
    for (const e of snaps[i]?.estimates ?? []) {
      const point = points.get(e.id);
      if (point) addEstimate(b, people, point, e.inputs.map(ids.estimate), null);
      if (freeze) b.relate("used", { "prov:activity": freeze, "prov:entity": ids.estimate(e.id) });
      b.relate("wasDerivedFrom", { "prov:generatedEntity": ex, "prov:usedEntity": ids.estimate(e.id), "prov:activity": freeze ?? undefined });
    }
  });
  return b.doc;
}

// The provenance of one run as PROV statements: run.json and sampler code used by the run activity,
// the archived files it generated, the import that read them into series, and every estimate derivation.
import crypto from "node:crypto";
import type { EstimateFacts, PersonFacts, RunFacts } from "./gather";
import { dateTime, qn, type ProvBuilder } from "./prov-document";

/** Inputs of the derived ising2d quantities (lib/estimates/derived-ising.ts): which series each is formed from. */
export const DERIVED_INPUTS: Record<string, string[]> = { U4: ["m2", "m4"], chi: ["absM", "m2"], C: ["e"] };

/** Identifiers of the pieces of a run's provenance. */
export const ids = {
  run: (id: string) => `run:${id}`,
  runJson: (id: string) => `run:${id}/run.json`,
  file: (sha: string) => `file:${sha}`,
  series: (runId: string, obs: string) => `series:${runId}/${obs}`,
  estimate: (id: string) => `est:${id}`,
  derivation: (id: string) => `est:${id}/derivation`,
  import: (id: string) => `imp:${id}`,
  person: (id: string) => `user:${id}`,
  sampler: (name: string, version: string) => `sampler:${name}/${version}`,
  code: (name: string, version: string) => `sampler:${name}/${version}/code`,
  spec: (ensembleId: string) => `ens:${ensembleId}/spec`,
};

/** Add a person as a prov:Person agent. */
export function addPerson(b: ProvBuilder, people: Map<string, PersonFacts>, id: string | null): string | null {
  if (!id) return null;
  const p = people.get(id);
  return b.agent(ids.person(id), { "prov:type": qn("prov:Person"), "prov:label": p?.name ?? id, "ergodex:role": p?.role });
}

/** The sampler as code (entity) and as the software agent that ran it. */
function addSampler(b: ProvBuilder, run: RunFacts): { code: string; agent: string } {
  const s = run.sampler;
  const code = b.entity(ids.code(s.name, s.version), {
    "prov:type": qn("ergodex:SamplerCode"), "prov:label": `${s.name} ${s.version}`, "ergodex:command": s.command,
    "ergodex:codeHash": s.codeHash, "ergodex:commit": run.samplerCommit,
  });
  const agent = b.agent(ids.sampler(s.name, s.version), {
    "prov:type": qn("prov:SoftwareAgent"), "prov:label": `${s.name} ${s.version}`, "ergodex:version": s.version,
  });
  return { code, agent };
}

/** The run.json the broker staged, rebuilt from the run, its point and its ensemble's spec. */
export function runJsonOf(run: RunFacts): Record<string, unknown> {
  return {
    format: "ergodex.run/1", runId: run.id, sampler: { name: run.sampler.name, version: run.sampler.version }, params: run.params,
    seed: run.seed, thermalization: run.spec.thermalization ?? null, measurements: run.spec.measurements ?? null, interval: run.spec.interval ?? 1,
  };
}

/** Add one estimate and the activity that derived it from `inputs` (entity ids), with who chose a manual cut. */
export function addEstimate(b: ProvBuilder, people: Map<string, PersonFacts>, e: EstimateFacts, inputs: string[], responsible: string | null): string {
  const est = b.entity(ids.estimate(e.id), {
    "prov:type": qn("ergodex:Estimate"), "prov:label": `${e.observable} = ${e.mean} ± ${e.error}`, "ergodex:scope": e.scope,
    "ergodex:observable": e.observable, "ergodex:mean": e.mean, "ergodex:error": e.error, "ergodex:tauInt": e.tauInt, "ergodex:n": e.n,
    "ergodex:version": e.version, "ergodex:isCurrent": e.isCurrent, "ergodex:chi2dof": e.chi2dof,
  });
  const act = b.activity(ids.derivation(e.id), {
    "prov:type": qn(e.scope === "run" ? "ergodex:SeriesAnalysis" : "ergodex:ReplicaCombination"),
    "prov:startTime": dateTime(e.createdAt), "prov:endTime": dateTime(e.createdAt),
    "ergodex:analysisVersion": e.analysisVersion, "ergodex:method": e.method, "ergodex:thermCut": e.thermCut, "ergodex:window": e.window,
    "ergodex:cutChoice": e.chosenById ? "manual" : "automatic", "ergodex:chosenAt": dateTime(e.chosenAt),
  });
  b.relate("wasGeneratedBy", { "prov:entity": est, "prov:activity": act, "prov:time": dateTime(e.createdAt) });
  for (const input of inputs) {
    b.relate("used", { "prov:activity": act, "prov:entity": input });
    b.relate("wasDerivedFrom", { "prov:generatedEntity": est, "prov:usedEntity": input, "prov:activity": act });
  }
  const chooser = addPerson(b, people, e.chosenById);
  if (chooser) {
    b.relate("wasAssociatedWith", { "prov:activity": act, "prov:agent": chooser, "prov:role": "ergodex:choseCut" });
    b.relate("wasAttributedTo", { "prov:entity": est, "prov:agent": chooser });
  } else if (responsible) {
    b.relate("wasAttributedTo", { "prov:entity": est, "prov:agent": responsible });
  }
  return est;
}

/** Add run `run` with its files, import(s), series and run estimates. */
export function addRun(b: ProvBuilder, run: RunFacts, people: Map<string, PersonFacts>): void {
  const { code, agent } = addSampler(b, run);
  const submitter = addPerson(b, people, run.ownerId)!;
  const runJson = runJsonOf(run);
  const input = b.entity(ids.runJson(run.id), {
    "prov:type": qn("ergodex:RunInput"), "prov:label": "run.json", "ergodex:seed": run.seed, "ergodex:params": JSON.stringify(run.params),
    "ergodex:sha256": crypto.createHash("sha256").update(JSON.stringify(runJson)).digest("hex"), "ergodex:document": JSON.stringify(runJson),
  });
  const spec = b.entity(ids.spec(run.ensembleId), { "prov:type": qn("ergodex:EnsembleSpec"), "prov:label": run.ensembleName, "ergodex:specHash": run.specHash });
  b.relate("wasDerivedFrom", { "prov:generatedEntity": input, "prov:usedEntity": spec });
  b.relate("wasAttributedTo", { "prov:entity": spec, "prov:agent": submitter });

  const upload = run.imports.find((i) => i.source === "upload");
  const act = b.activity(ids.run(run.id), {
    "prov:type": qn("ergodex:MarkovChainRun"), "prov:label": `run ${run.id.slice(0, 8)} (replica ${run.replica})`,
    "prov:startTime": dateTime(run.startedAt), "prov:endTime": dateTime(run.finishedAt),
    "prov:location": run.cluster ? `${run.cluster.name}${run.host ? ` / ${run.host}` : ""}` : run.host ?? undefined,
    "ergodex:cluster": run.cluster?.name, "ergodex:host": run.host, "ergodex:command": `${run.sampler.command} run.json out`,
    "ergodex:seed": run.seed, "ergodex:attempt": run.attempt, "ergodex:exitCode": run.exitCode, "ergodex:state": run.state, "ergodex:source": run.source,
  });
  b.relate("used", { "prov:activity": act, "prov:entity": input });
  b.relate("used", { "prov:activity": act, "prov:entity": code });
  b.relate("wasAssociatedWith", { "prov:activity": act, "prov:agent": agent, "prov:plan": code, "prov:role": "ergodex:sampler" });
  b.relate("wasAssociatedWith", { "prov:activity": act, "prov:agent": submitter, "prov:role": "ergodex:submitter" });

  const uploader = addPerson(b, people, upload?.uploadedById ?? null);
  const seriesFile = run.files.find((f) => f.role === "series");
  for (const f of run.files) {
    const file = b.entity(ids.file(f.sha256), {
      "prov:type": qn("ergodex:ArchivedFile"), "prov:label": f.path, "ergodex:sha256": f.sha256, "ergodex:bytes": f.bytes,
      "ergodex:mediaType": f.mediaType, "ergodex:role": f.role,
    });
    b.relate("wasGeneratedBy", { "prov:entity": file, "prov:activity": act, "prov:time": dateTime(run.finishedAt) });
    b.relate("wasAttributedTo", { "prov:entity": file, "prov:agent": uploader ?? submitter });
  }
  for (const imp of run.imports) {
    const ia = b.activity(ids.import(imp.id), {
      "prov:type": qn("ergodex:Import"), "prov:startTime": dateTime(imp.createdAt), "prov:endTime": dateTime(imp.createdAt),
      "ergodex:importerVersion": imp.importerVersion, "ergodex:source": imp.source, "ergodex:bundleHash": imp.bundleHash,
      "ergodex:originalNames": imp.originalNames.length ? imp.originalNames.join(", ") : undefined,
    });
    for (const f of run.files) b.relate("used", { "prov:activity": ia, "prov:entity": ids.file(f.sha256) });
    const who = addPerson(b, people, imp.uploadedById);
    if (who) b.relate("wasAssociatedWith", { "prov:activity": ia, "prov:agent": who, "prov:role": "ergodex:uploader" });
  }
  const importAct = run.imports[0] ? ids.import(run.imports[0].id) : undefined;
  for (const obs of run.series) {
    const s = b.entity(ids.series(run.id, obs), { "prov:type": qn("ergodex:Series"), "prov:label": `${obs} of run ${run.id.slice(0, 8)}`, "ergodex:observable": obs });
    if (importAct) b.relate("wasGeneratedBy", { "prov:entity": s, "prov:activity": importAct });
    if (seriesFile) b.relate("wasDerivedFrom", { "prov:generatedEntity": s, "prov:usedEntity": ids.file(seriesFile.sha256), "prov:activity": importAct });
  }
  for (const e of run.estimates) {
    const inputs = (DERIVED_INPUTS[e.observable] && run.sampler.name === "ising2d" ? DERIVED_INPUTS[e.observable] : [e.observable])
      .filter((o) => run.series.includes(o)).map((o) => ids.series(run.id, o));
    addEstimate(b, people, e, inputs, null);
  }
}

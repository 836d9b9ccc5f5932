import "server-only";
// PROV-JSON of one estimate: the run(s) beneath it and, for a point estimate, the combination of its replicas.
import type { Target } from "@/lib/auth/scope";
import { modelsFor } from "@/lib/db/models-for";
import { AppError } from "@/lib/errors";
import { addEstimate, addRun, ids } from "./add-run";
import { gatherEstimates, gatherPeople, gatherRuns } from "./gather";
import { pointInputs } from "./prov-for";
import { ProvBuilder, type ProvDocument } from "./prov-document";

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

/** The guard's target of an estimate: its ensemble's group and owner (null when there is none). */
export async function estimateTarget(id: string): Promise<Target | null> {
  if (!UUID.test(id)) return null;
  const rows = (await modelsFor().sequelize.query(`SELECT e.id, en.group_id, en.owner_id FROM estimates e JOIN ensembles en ON en.id = e.ensemble_id WHERE e.id = $1`,
    { bind: [id], type: "SELECT" })) as { id: string; group_id: string; owner_id: string }[];
  return rows[0] ? { type: "estimate", id: rows[0].id, groupId: rows[0].group_id, ownerId: rows[0].owner_id } : null;
}

/** PROV-JSON of estimate `id`: a run estimate with its run; a point estimate with its replicas' runs and the run estimates it combined. */
export async function provForEstimate(id: string): Promise<ProvDocument> {
  const [e] = await gatherEstimates([id]);
  if (!e) throw new AppError("not_found", `estimate ${id} does not exist`);
  const runIds = e.runId ? [e.runId] : ((await modelsFor().sequelize.query(`SELECT id FROM runs WHERE point_id = $1`, { bind: [e.pointId], type: "SELECT" })) as { id: string }[]).map((r) => r.id);
  const runs = await gatherRuns(runIds);
  const wanted = runs.flatMap((r) => [r.ownerId, ...r.imports.map((i) => i.uploadedById), ...r.estimates.map((x) => x.chosenById)]);
  const people = new Map((await gatherPeople([...wanted, e.chosenById].filter((x): x is string => !!x))).map((p) => [p.id, p]));
  const b = new ProvBuilder();
  for (const r of runs) addRun(b, r, people);
  if (e.scope === "point") addEstimate(b, people, e, pointInputs(e, runs).map((x) => ids.estimate(x.id)), null);
  return b.doc;
}

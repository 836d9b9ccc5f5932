import "server-only";
// Where an uploaded run lives: per group and sampler one "archive" ensemble, a point per parameter set, a run per bundle.
import crypto from "node:crypto";
import { QueryTypes, type Transaction } from "sequelize";
import { modelsFor } from "@/lib/db/models-for";
import { recordRunsCreated } from "@/lib/runs/transition-run";
import type { Manifest } from "@/lib/importer/manifest-schema";
import type { Sampler } from "@/models";

/** The rows made for one uploaded bundle. */
export type ArchiveRun = { ensembleId: string; pointId: string; runId: string };

/**
 * Find or create, in `transaction`, the group's archive ensemble for the manifest's sampler and
 * the point with the manifest's params, then create the run (source "upload", state done, seed
 * from the manifest). A transaction-scoped advisory lock per (group, sampler) serialises
 * concurrent uploads, so there is one archive ensemble and replica numbers do not collide.
 */
export async function createArchiveRun(
  input: { groupId: string; ownerId: string; sampler: Sampler; manifest: Manifest }, transaction: Transaction,
): Promise<ArchiveRun> {
  const m = modelsFor(transaction);
  const { groupId, sampler, manifest } = input;
  await m.sequelize.query(`SELECT pg_advisory_xact_lock(hashtextextended($1, 0))`, { bind: [`ergodex.archive:${groupId}:${sampler.id}`], transaction });

  const spec = { format: "ergodex.archive/1", sampler: { name: sampler.name, version: sampler.version }, groupId };
  const specHash = crypto.createHash("sha256").update(JSON.stringify(spec)).digest("hex");
  let ensemble = await m.Ensemble.findOne({ where: { groupId, samplerId: sampler.id, specHash, allocationId: null, clusterId: null }, transaction });
  ensemble ??= await m.Ensemble.create({
    name: `Uploaded ${sampler.name} ${sampler.version} runs`,
    description: "Runs done outside Ergodex, brought in as uploaded result bundles.",
    ownerId: input.ownerId, groupId, samplerId: sampler.id, allocationId: null, clusterId: null,
    spec, specHash, masterSeed: "0", tags: ["uploaded"], state: "done",
  }, { transaction });

  const [found] = await m.sequelize.query<{ id: string }>(
    `SELECT id FROM parameter_points WHERE ensemble_id = $1 AND params = $2::jsonb LIMIT 1`,
    { bind: [ensemble.id, JSON.stringify(manifest.params)], type: QueryTypes.SELECT, transaction },
  );
  let pointId = found?.id;
  if (!pointId) {
    const [{ next }] = await m.sequelize.query<{ next: number }>(
      `SELECT coalesce(max(point_index) + 1, 0)::int AS next FROM parameter_points WHERE ensemble_id = $1`, { bind: [ensemble.id], type: QueryTypes.SELECT, transaction });
    pointId = (await m.ParameterPoint.create({ ensembleId: ensemble.id, pointIndex: next, params: manifest.params }, { transaction })).id;
  }
  const [{ replica }] = await m.sequelize.query<{ replica: number }>(
    `SELECT coalesce(max(replica) + 1, 0)::int AS replica FROM runs WHERE point_id = $1`, { bind: [pointId], type: QueryTypes.SELECT, transaction });
  const run = await m.Run.create({
    ensembleId: ensemble.id, pointId, replica, seed: manifest.seed, state: "done", source: "upload",
    startedAt: new Date(manifest.startedAt), finishedAt: new Date(manifest.finishedAt), exitCode: manifest.exitStatus,
    progress: 1, host: manifest.host,
  }, { transaction });
  await recordRunsCreated([run], { transaction, cause: "upload", actorId: input.ownerId, detail: { manifestRunId: manifest.runId } });
  return { ensembleId: ensemble.id, pointId, runId: run.id };
}

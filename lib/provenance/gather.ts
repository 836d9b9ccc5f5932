import "server-only";
// Everything the provenance of a set of runs rests on, read in a few set-based queries.
import type { Transaction } from "sequelize";
import { modelsFor } from "@/lib/db/models-for";

/** One run with what it ran on, who asked for it, what it produced and what was derived from it. */
export type RunFacts = {
  id: string; ensembleId: string; pointId: string; replica: number; seed: string; state: string; attempt: number; source: string;
  params: Record<string, unknown>; startedAt: Date | null; finishedAt: Date | null; exitCode: number | null;
  host: string | null; samplerCommit: string | null; workDir: string | null;
  ensembleName: string; spec: Record<string, unknown>; specHash: string; ownerId: string; groupId: string;
  sampler: { id: string; name: string; version: string; command: string; codeHash: string | null };
  cluster: { id: string; name: string; kind: string; host: string } | null;
  files: { path: string; role: string; sha256: string; bytes: number; mediaType: string; storagePath: string }[];
  imports: { id: string; source: string; importerVersion: string; uploadedById: string | null; originalNames: string[]; bundleHash: string; createdAt: Date }[];
  series: string[];
  estimates: EstimateFacts[];
};

/** An estimate row with the fields provenance names. */
export type EstimateFacts = {
  id: string; scope: "run" | "point"; runId: string | null; pointId: string; ensembleId: string; observable: string;
  mean: number; error: number; tauInt: number | null; thermCut: number; n: number; window: number | null; method: string;
  analysisVersion: string; version: number; isCurrent: boolean; chosenById: string | null; chosenAt: Date | null;
  chi2dof: number | null; createdAt: Date;
};

/** A person named in a provenance document. */
export type PersonFacts = { id: string; name: string; role: string };

const EST_COLUMNS = `e.id, e.scope, e.run_id AS "runId", e.point_id AS "pointId", e.ensemble_id AS "ensembleId", e.observable, e.mean, e.error,
  e.tau_int AS "tauInt", e.therm_cut AS "thermCut", e.n, e."window", e.method, e.analysis_version AS "analysisVersion", e.version,
  e.is_current AS "isCurrent", e.chosen_by_id AS "chosenById", e.chosen_at AS "chosenAt", e.chi2dof, e.created_at AS "createdAt"`;

/** Facts of runs `runIds` (unknown ids are skipped), in ensemble, point and replica order. */
export async function gatherRuns(runIds: readonly string[], transaction?: Transaction): Promise<RunFacts[]> {
  if (runIds.length === 0) return [];
  const { sequelize } = modelsFor(transaction);
  const q = <T>(sql: string) => sequelize.query(sql, { bind: [runIds], transaction, type: "SELECT" }) as Promise<T[]>;
  const [runs, files, imports, series, estimates] = await Promise.all([
    q<Omit<RunFacts, "files" | "imports" | "series" | "estimates">>(`
      SELECT r.id, r.ensemble_id AS "ensembleId", r.point_id AS "pointId", r.replica, r.seed, r.state, r.attempt, r.source, p.params,
             r.started_at AS "startedAt", r.finished_at AS "finishedAt", r.exit_code AS "exitCode", r.host, r.sampler_commit AS "samplerCommit",
             r.work_dir AS "workDir", en.name AS "ensembleName", en.spec, en.spec_hash AS "specHash", en.owner_id AS "ownerId", en.group_id AS "groupId",
             json_build_object('id', s.id, 'name', s.name, 'version', s.version, 'command', s.command, 'codeHash', s.code_hash) AS sampler,
             CASE WHEN c.id IS NULL THEN NULL ELSE json_build_object('id', c.id, 'name', c.name, 'kind', c.kind, 'host', c.host) END AS cluster
        FROM runs r JOIN parameter_points p ON p.id = r.point_id JOIN ensembles en ON en.id = r.ensemble_id
        JOIN samplers s ON s.id = en.sampler_id LEFT JOIN clusters c ON c.id = en.cluster_id
       WHERE r.id = ANY($1) ORDER BY en.created_at, p.point_index, r.replica`),
    q<{ runId: string } & RunFacts["files"][number]>(`
      SELECT ra.run_id AS "runId", ra.path, ra.role, a.sha256, a.bytes::float8 AS bytes, a.media_type AS "mediaType", a.storage_path AS "storagePath"
        FROM run_artifacts ra JOIN artifacts a ON a.sha256 = ra.artifact_sha256 WHERE ra.run_id = ANY($1) ORDER BY ra.path`),
    q<{ runId: string } & RunFacts["imports"][number]>(`
      SELECT run_id AS "runId", id, source, importer_version AS "importerVersion", uploaded_by_id AS "uploadedById",
             original_names AS "originalNames", bundle_hash AS "bundleHash", created_at AS "createdAt"
        FROM imports WHERE run_id = ANY($1) AND state = 'accepted' ORDER BY created_at`),
    q<{ runId: string; observable: string }>(`SELECT DISTINCT run_id AS "runId", observable FROM series WHERE run_id = ANY($1) ORDER BY observable`),
    q<EstimateFacts>(`SELECT ${EST_COLUMNS} FROM estimates e WHERE e.scope = 'run' AND e.run_id = ANY($1) ORDER BY e.observable, e.version`),
  ]);
  const by = <T extends { runId: string | null }>(rows: T[], id: string) => rows.filter((r) => r.runId === id);
  return runs.map((r) => ({
    ...r,
    files: by(files, r.id).map(({ runId: _r, ...f }) => f),
    imports: by(imports, r.id).map(({ runId: _r, ...i }) => i),
    series: by(series, r.id).map((s) => s.observable),
    estimates: by(estimates, r.id),
  }));
}

/** Estimates by id (any scope), in the order asked. */
export async function gatherEstimates(ids: readonly string[], transaction?: Transaction): Promise<EstimateFacts[]> {
  if (ids.length === 0) return [];
  const { sequelize } = modelsFor(transaction);
  const rows = (await sequelize.query(`SELECT ${EST_COLUMNS} FROM estimates e WHERE e.id = ANY($1)`, { bind: [ids], transaction, type: "SELECT" })) as EstimateFacts[];
  const index = new Map(rows.map((r) => [r.id, r]));
  return ids.flatMap((id) => index.get(id) ?? []);
}

/** Point estimates of an ensemble (every version). */
export async function gatherPointEstimates(ensembleId: string, transaction?: Transaction): Promise<EstimateFacts[]> {
  const { sequelize } = modelsFor(transaction);
  return (await sequelize.query(`SELECT ${EST_COLUMNS} FROM estimates e WHERE e.scope = 'point' AND e.ensemble_id = $1 ORDER BY e.observable, e.point_id, e.version`,
    { bind: [ensembleId], transaction, type: "SELECT" })) as EstimateFacts[];
}

/** People by id. */
export async function gatherPeople(ids: Iterable<string>, transaction?: Transaction): Promise<PersonFacts[]> {
  const list = [...new Set(ids)];
  if (list.length === 0) return [];
  const { sequelize } = modelsFor(transaction);
  return (await sequelize.query(`SELECT id, name, role FROM users WHERE id = ANY($1) ORDER BY name`, { bind: [list], transaction, type: "SELECT" })) as PersonFacts[];
}

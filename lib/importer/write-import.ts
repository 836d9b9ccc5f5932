import "server-only";
// The one transaction of a good import: Import, archived files, RunArtifacts, Series by COPY, run estimates.
import path from "node:path";
import type { Transaction } from "sequelize";
import { modelsFor } from "@/lib/db/models-for";
import { AppError } from "@/lib/errors";
import { computeRunEstimates, type EstimateProblem } from "@/lib/estimates/compute-run-estimates";
import { archiveFile } from "@/lib/storage/archive-file";
import type { RunArtifactRole } from "@/models/run-artifact";
import type { RunSource } from "@/models/run";
import { IMPORTER_VERSION } from "./bundle-hash";
import { copySeries } from "./copy-series";
import { MANIFEST } from "./read-manifest";
import type { ValidBundle } from "./validate-bundle";

/** Input of {@link writeImport}. */
export type WriteImportInput = {
  dir: string; runId: string; bundleHash: string; bundle: ValidBundle;
  source: RunSource; uploadedById: string | null; originalNames: string[];
};

/** Outcome of the transaction: imported, or found already imported by a concurrent import. */
export type WriteImportResult =
  | { status: "imported"; importId: string; seriesRows: number; problems: EstimateProblem[] }
  | { status: "already-imported"; importId: string; runId: string | null };

/** Write a validated bundle in `transaction`; see importBundle for the guarantees. */
export async function writeImport(input: WriteImportInput, transaction: Transaction): Promise<WriteImportResult> {
  const m = modelsFor(transaction);
  const { manifest, series } = input.bundle;
  // Serialises imports of one run; NO KEY UPDATE still lets a separate transaction reference the run.
  await m.sequelize.query(`SELECT 1 FROM runs WHERE id = $1 FOR NO KEY UPDATE`, { bind: [input.runId], transaction });
  const existing = await m.Import.findOne({ where: { bundleHash: input.bundleHash }, transaction, lock: transaction.LOCK.UPDATE });
  if (existing?.state === "accepted") return { status: "already-imported", importId: existing.id, runId: existing.runId };
  const other = await m.Import.findOne({ where: { runId: input.runId, state: "accepted" }, transaction });
  if (other) {
    throw new AppError("conflict", `run ${input.runId} already has an imported bundle (import ${other.id}); a run keeps its first result`, { importId: other.id });
  }

  const fields = {
    runId: input.runId, source: input.source, uploadedById: input.uploadedById, originalNames: input.originalNames,
    bundleHash: input.bundleHash, state: "accepted" as const, rejectReason: null, importerVersion: IMPORTER_VERSION,
  };
  const record = existing ? await existing.update(fields, { transaction }) : await m.Import.create(fields, { transaction });

  const listed: { path: string; role: RunArtifactRole; sha256?: string }[] = [
    { path: MANIFEST, role: "manifest", sha256: input.bundleHash },
    ...manifest.files.map((f) => ({ path: f.path, sha256: f.sha256, role: (f.path === manifest.series.file ? "series" : "extra") as RunArtifactRole })),
  ];
  const artifacts = [];
  for (const f of listed) {
    const a = await archiveFile(path.join(input.dir, f.path), { transaction, name: f.path, expectSha256: f.sha256 });
    artifacts.push({ runId: input.runId, path: f.path, artifactSha256: a.sha256, role: f.role });
  }
  await m.RunArtifact.bulkCreate(artifacts, { transaction });

  const seriesRows = await copySeries(transaction, input.runId, series.columns, series.values);
  await m.Run.update({ samplerCommit: manifest.sampler.commit ?? null, host: manifest.host }, { where: { id: input.runId }, transaction });

  const byName = new Map(series.columns.map((c, k) => [c, series.values[k]] as const));
  // Point estimates are not formed here: the caller does that once the point's replicas are final
  // (lib/runs/after-run-final.ts), so a point does not collect a version per arriving replica.
  const runEstimates = await computeRunEstimates(input.runId, { transaction, series: byName });
  return { status: "imported", importId: record.id, seriesRows, problems: runEstimates.problems };
}

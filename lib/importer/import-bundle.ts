import "server-only";
// Bring a result bundle in: validate it whole, then write it in one transaction, or record why it was refused.
import fs from "node:fs";
import type { Transaction } from "sequelize";
import { modelsFor } from "@/lib/db/models-for";
import { AppError } from "@/lib/errors";
import type { EstimateProblem } from "@/lib/estimates/compute-run-estimates";
import type { RunSource } from "@/models/run";
import { bundleError } from "./bundle-error";
import { bundleHashOf } from "./bundle-hash";
import { parseManifest, readManifestBytes, MANIFEST } from "./read-manifest";
import { recordRejection } from "./record-rejection";
import { loadRunContext, resolveRun, type RunContext } from "./run-context";
import { validateBundle } from "./validate-bundle";
import { writeImport } from "./write-import";

/** What to import: a bundle folder, the run it belongs to (null: the run its manifest names), and where it came from. */
export type ImportBundleInput = {
  runId: string | null;
  dir: string;
  source: RunSource;
  uploadedById?: string | null;
  /** File names as the uploader had them; default: the bundle's own file names. */
  originalNames?: string[];
};

/** Result of {@link importBundle}; `problems` lists observables left without an estimate, and why. */
export type ImportBundleResult = {
  status: "imported" | "already-imported";
  importId: string;
  runId: string;
  observables: string[];
  rows: number;
  problems: EstimateProblem[];
};

/**
 * Import the result bundle in `dir` as run `runId`. The whole bundle is validated first (manifest,
 * run and sampler agreement, file hashes, series contents); then Import, Artifact, RunArtifact,
 * Series (COPY, chunks of float8[]) and the run's Estimate rows are written in one transaction —
 * the caller's if given. Point estimates are the caller's next step (computePointEstimates). A bundle already imported (same manifest bytes) is a
 * no-op returning "already-imported". A refused bundle throws AppError("invalid") naming file and
 * line or field (or "conflict" if the run already has another result) and leaves only a rejected
 * Import row, written in a transaction of its own.
 */
export async function importBundle(input: ImportBundleInput, options: { transaction?: Transaction } = {}): Promise<ImportBundleResult> {
  const { transaction } = options;
  const m = modelsFor(transaction);
  if (!fs.existsSync(input.dir)) throw new AppError("bad_request", `bundle folder ${input.dir} does not exist`);
  if (!fs.lstatSync(input.dir).isDirectory()) throw new AppError("bad_request", `bundle ${input.dir} is not a folder (links are not followed)`);
  // A named run must exist before anything else: a rejection is then recorded against it.
  let context: RunContext | undefined;
  if (input.runId !== null) {
    context = (await loadRunContext(input.runId, transaction)) ?? undefined;
    if (!context) throw new AppError("not_found", `run ${input.runId} does not exist (or has no point or sampler)`);
  }
  const bundleHash = await bundleHashOf(input.dir);
  const originalNames = input.originalNames ?? defaultNames(input.dir);

  const known = await m.Import.findOne({ where: { bundleHash, state: "accepted" }, transaction });
  if (known) return alreadyImported(known.id, known.runId, input.runId);

  try {
    const bytes = readManifestBytes(input.dir);
    if (!bytes) throw bundleError({ file: MANIFEST }, "is missing: a result bundle must contain manifest.json");
    const bundle = await validateBundle(input.dir, bytes, async (manifest) => {
      const resolved = await resolveRun(input.runId, input.source, manifest, transaction, context);
      context = resolved.context;
      return resolved.expectation;
    });
    const run = context!.run;
    const write = (t: Transaction) => writeImport({
      dir: input.dir, runId: run.id, bundleHash, bundle,
      source: input.source, uploadedById: input.uploadedById ?? null, originalNames,
    }, t);
    const outcome = transaction ? await write(transaction) : await m.sequelize.transaction(write);
    if (outcome.status === "already-imported") return alreadyImported(outcome.importId, outcome.runId, input.runId);
    return {
      status: "imported", importId: outcome.importId, runId: run.id,
      observables: bundle.manifest.observables.map((o) => o.name), rows: bundle.series.rows, problems: outcome.problems,
    };
  } catch (err) {
    if (isUniqueViolation(err) && !transaction) {
      // A concurrent import of the same bundle committed first.
      const winner = await m.Import.findOne({ where: { bundleHash, state: "accepted" } });
      if (winner) return alreadyImported(winner.id, winner.runId, input.runId);
    }
    if (err instanceof AppError && (err.code === "invalid" || err.code === "conflict")) {
      const importId = await recordRejection(m.sequelize, {
        bundleHash, runId: context?.run.id ?? null, source: input.source, uploadedById: input.uploadedById, originalNames, reason: err.message,
      });
      err.details = { ...err.details, importId, bundleHash };
    }
    throw err;
  }

  async function alreadyImported(importId: string, runId: string | null, wanted: string | null): Promise<ImportBundleResult> {
    if (wanted !== null && runId !== wanted) {
      throw new AppError("conflict", `this bundle was already imported as run ${runId ?? "(deleted)"} (import ${importId}), not ${wanted}`, { importId });
    }
    const bytes = readManifestBytes(input.dir)!;
    const manifest = parseManifest(bytes);
    return { status: "already-imported", importId, runId: runId!, observables: manifest.observables.map((o) => o.name), rows: manifest.series.rows, problems: [] };
  }
}

function defaultNames(dir: string): string[] {
  try {
    return fs.readdirSync(dir).sort();
  } catch {
    return [];
  }
}

function isUniqueViolation(err: unknown): boolean {
  const e = err as { name?: string; parent?: { code?: string }; original?: { code?: string } };
  return e?.name === "SequelizeUniqueConstraintError" || e?.parent?.code === "23505" || e?.original?.code === "23505";
}

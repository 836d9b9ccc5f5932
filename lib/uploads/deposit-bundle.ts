import "server-only";
// One uploaded bundle folder → accepted, already imported, or refused; a refusal leaves only its rejected Import row.
import { modelsFor } from "@/lib/db/models-for";
import { AppError } from "@/lib/errors";
import { computePointEstimates } from "@/lib/estimates/compute-point-estimates";
import { bundleError } from "@/lib/importer/bundle-error";
import { bundleHashOf } from "@/lib/importer/bundle-hash";
import { importBundle } from "@/lib/importer/import-bundle";
import { MANIFEST, parseManifest, readManifestBytes } from "@/lib/importer/read-manifest";
import { recordRejection } from "@/lib/importer/record-rejection";
import { validateBundle, type ValidBundle } from "@/lib/importer/validate-bundle";
import { recordAudit, type AuditSource } from "@/lib/audit/record-audit";
import type { Sampler } from "@/models";
import { createArchiveRun } from "./archive-run";

/** The outcome for one bundle of an upload. */
export type BundleOutcome =
  | { bundle: string; status: "accepted"; importId: string; runId: string; ensembleId: string; observables: string[]; rows: number }
  | { bundle: string; status: "already-imported"; importId: string; runId: string | null }
  | { bundle: string; status: "refused"; reason: string; importId: string | null; file?: string; line?: number; field?: string };

/** Steps of one deposit, in order, as progress reports name them. */
export type BundleStage = "checking" | "importing" | "estimates";

/** Who deposits into which group, how the bundle is named in answers and on the Import row, and who hears of each step. */
export type DepositInput = { dir: string; label: string; originalNames: string[]; groupId: string; uploaderId: string; audit: AuditSource; onStage?: (stage: BundleStage) => void };

class Superseded extends Error {}

/**
 * Deposit the bundle in `dir`: validate it whole first (the same validator as cluster results,
 * against the sampler its manifest names), then in ONE transaction create its archive
 * ensemble/point/run, import it with importBundle and recompute the point's estimates. The
 * pre-validation matters: importBundle records a refusal in a separate transaction, which must
 * not reference a run that the refusal rolls back — so refusals are recorded here with no run.
 */
export async function depositBundle(input: DepositInput): Promise<BundleOutcome> {
  const m = modelsFor();
  const { dir, label } = input;
  const stage = (st: BundleStage) => input.onStage?.(st);
  let bundleHash: string | null = null;
  try {
    stage("checking");
    bundleHash = await bundleHashOf(dir);
    const known = await m.Import.findOne({ where: { bundleHash, state: "accepted" } });
    if (known) return { bundle: label, status: "already-imported", importId: known.id, runId: known.runId };
    const { sampler, bundle } = await preValidate(dir);
    return await m.sequelize.transaction(async (transaction) => {
      stage("importing");
      const rows = await createArchiveRun({ groupId: input.groupId, ownerId: input.uploaderId, sampler, manifest: bundle.manifest }, transaction);
      const result = await importBundle({ runId: rows.runId, dir, source: "upload", uploadedById: input.uploaderId, originalNames: input.originalNames }, { transaction });
      if (result.status !== "imported") throw new Superseded();
      stage("estimates");
      await computePointEstimates(rows.pointId, { transaction });
      await recordAudit(input.audit, "import.upload", { type: "run", id: rows.runId, groupId: input.groupId },
        { importId: result.importId, bundleHash, originalNames: input.originalNames.slice(0, 50) }, transaction);
      return { bundle: label, status: "accepted" as const, importId: result.importId, runId: rows.runId, ensembleId: rows.ensembleId, observables: result.observables, rows: result.rows };
    });
  } catch (err) {
    if (bundleHash && (err instanceof Superseded || isUniqueViolation(err))) {
      // A concurrent upload of the same bundle committed first; ours rolled back whole.
      const winner = await m.Import.findOne({ where: { bundleHash, state: "accepted" } });
      if (winner) return { bundle: label, status: "already-imported", importId: winner.id, runId: winner.runId };
    }
    if (err instanceof AppError && (err.code === "invalid" || err.code === "conflict" || err.code === "bad_request")) {
      const importId = bundleHash
        ? await recordRejection(m.sequelize, { bundleHash, runId: null, source: "upload", uploadedById: input.uploaderId, originalNames: input.originalNames, reason: err.message })
        : null;
      const d = err.details ?? {};
      return {
        bundle: label, status: "refused", reason: err.message, importId,
        file: typeof d.file === "string" ? d.file : undefined, line: typeof d.line === "number" ? d.line : undefined, field: typeof d.field === "string" ? d.field : undefined,
      };
    }
    throw err;
  }
}

/** Every check importBundle makes, against the registered sampler the manifest names, before any row exists. */
async function preValidate(dir: string): Promise<{ sampler: Sampler; bundle: ValidBundle }> {
  const bytes = readManifestBytes(dir);
  if (!bytes) throw bundleError({ file: MANIFEST }, "is missing: a result bundle must contain manifest.json");
  const manifest = parseManifest(bytes);
  const sampler = await modelsFor().Sampler.findOne({ where: { name: manifest.sampler?.name ?? "", version: manifest.sampler?.version ?? "" } });
  let found: Sampler | null = sampler;
  const bundle = await validateBundle(dir, bytes, async (mf) => {
    if (!found) {
      const known = await modelsFor().Sampler.findAll({ attributes: ["name", "version"], order: [["name", "ASC"], ["version", "ASC"]] });
      throw bundleError({ file: MANIFEST, field: "/sampler" }, `${mf.sampler.name} ${mf.sampler.version} is not a registered sampler (registered: ${known.map((s) => `${s.name} ${s.version}`).join(", ") || "none"})`);
    }
    return { sampler: { name: found.name, version: found.version, observables: (found.observables ?? []).map((o) => o.name) }, params: mf.params };
  });
  found = found!;
  return { sampler: found, bundle };
}

function isUniqueViolation(err: unknown): boolean {
  const e = err as { name?: string; parent?: { code?: string } };
  return e?.name === "SequelizeUniqueConstraintError" || e?.parent?.code === "23505";
}

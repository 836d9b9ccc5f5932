import "server-only";
// POST /api/v1/imports end to end: receive, unpack safely, find bundles, deposit each; the upload's folder is always removed.
import fs from "node:fs";
import path from "node:path";
import type { AuditSource } from "@/lib/audit/record-audit";
import type { Identity } from "@/lib/auth/identity";
import { AppError } from "@/lib/errors";
import { UnpackBudget } from "./budget";
import { depositBundle, type BundleOutcome, type BundleStage } from "./deposit-bundle";
import { findBundles, listFiles } from "./find-bundles";
import { uploadLimits, type UploadLimits } from "./limits";
import { makeUploadRoot, receiveUpload, type ReceivedFile } from "./receive-upload";
import { resolveUploadGroup } from "./upload-group";
import { looksLikeArchive, sniffKind } from "./sniff";
import { unpackTar } from "./unpack-tar";
import { unpackZip } from "./unpack-zip";

/** The answer to one upload: an outcome per bundle (or per archive that could not be unpacked) and the counts. */
export type UploadResult = { groupId: string; bundles: BundleOutcome[]; accepted: number; alreadyImported: number; refused: number };

/** What the upload is doing, reported once per step (POST /api/v1/imports streams these as NDJSON lines). */
export type UploadProgress =
  | { type: "received"; bytes: number; bundles: number; refusedEarly: number }
  | { type: "bundle"; index: number; total: number; bundle: string; stage: BundleStage }
  | { type: "outcome"; index: number; total: number; outcome: BundleOutcome };

/** A received, unpacked upload whose bundles are found but not yet deposited; `deposit` runs them and removes the folder. */
export type PreparedUpload = { groupId: string; bundles: number; deposit: (onProgress?: (p: UploadProgress) => void) => Promise<UploadResult>; discard: () => void };

/** Receive the upload in `req` as `who` and deposit every bundle in it (see docs/uploads.md). */
export async function depositUpload(req: Request, who: Identity, audit: AuditSource, limits: UploadLimits = uploadLimits(),
  onProgress?: (p: UploadProgress) => void): Promise<UploadResult> {
  return (await prepareUpload(req, who, audit, limits)).deposit(onProgress);
}

/**
 * Receive, unpack and find the bundles (every upload-level refusal — size, type, group, empty — is
 * thrown here, before any answer has started), leaving the deposits to `deposit`.
 */
export async function prepareUpload(req: Request, who: Identity, audit: AuditSource, limits: UploadLimits = uploadLimits()): Promise<PreparedUpload> {
  const root = makeUploadRoot(limits);
  const discard = () => fs.rmSync(root, { recursive: true, force: true });
  try {
    const received = await receiveUpload(req, root, limits);
    const receivedBytes = received.files.reduce((a, f) => a + f.bytes, 0);
    if (received.files.length === 0) throw new AppError("invalid", "the upload is empty: send the files of a result bundle, or one .zip or .tar.gz of bundles");
    const groupId = await resolveUploadGroup(who, received.fields.group ?? new URL(req.url).searchParams.get("group"));
    const bundles: BundleOutcome[] = [];
    const budget = new UnpackBudget(limits);
    const loose: ReceivedFile[] = [];
    const sources: { dir: string; prefix: string | null }[] = [];
    for (const [k, f] of received.files.entries()) {
      const kind = sniffKind(f.file);
      if (kind === "other") {
        if (f.bytes === 0 && looksLikeArchive(f.name)) { bundles.push(refusedUpload(f.name, `${f.name}: is empty (0 bytes)`)); continue; }
        if (looksLikeArchive(f.name) || received.files.length === 1 && !received.multipart) {
          bundles.push(refusedUpload(f.name, `${f.name}: is not a .zip or .tar.gz archive (its first bytes are neither a zip nor a gzip header)`));
          continue;
        }
        loose.push(f);
        continue;
      }
      const target = path.join(root, "unpacked", String(k));
      fs.mkdirSync(target, { recursive: true });
      try {
        if (kind === "zip") await unpackZip(f.file, f.name, target, budget);
        else await unpackTar(f.file, f.name, target, budget, kind === "gzip");
        sources.push({ dir: target, prefix: f.name });
      } catch (err) {
        if (!(err instanceof AppError)) throw err;
        bundles.push(refusedUpload(f.name, err.message));
      } finally {
        fs.rmSync(f.file, { force: true });
      }
    }
    if (loose.length > 0) {
      const dir = path.join(root, "files");
      for (const f of loose) {
        budget.addFile(`upload: ${f.name}`);
        budget.declare(f.bytes, `upload: ${f.name}`);
        budget.bytes += f.bytes;
        const out = path.join(dir, f.name);
        if (fs.existsSync(out)) throw new AppError("invalid", `upload: ${f.name} is sent twice`, { file: f.name });
        fs.mkdirSync(path.dirname(out), { recursive: true });
        fs.renameSync(f.file, out);
      }
      sources.push({ dir, prefix: null });
    }
    const work: { dir: string; label: string; names: string[] }[] = [];
    for (const source of sources) {
      const found = findBundles(source.dir);
      if (found.length === 0 && source.prefix) bundles.push(refusedUpload(source.prefix, `${source.prefix}: holds no files`));
      for (const b of found) {
        const names = listFiles(b.dir).map((n) => joinName(source.prefix, b.rel, n));
        work.push({ dir: b.dir, label: source.prefix ? `${source.prefix}:${b.rel || "."}` : b.rel || "uploaded files", names });
      }
    }
    const early = bundles.length;
    const total = early + work.length;
    const deposit = async (onProgress: (p: UploadProgress) => void = () => {}): Promise<UploadResult> => {
      try {
        onProgress({ type: "received", bytes: receivedBytes, bundles: total, refusedEarly: early });
        for (const [i, o] of bundles.entries()) onProgress({ type: "outcome", index: i, total, outcome: o });
        for (const [k, w] of work.entries()) {
          const index = early + k;
          const outcome = await depositBundle({ dir: w.dir, label: w.label, originalNames: w.names, groupId, uploaderId: who.userId, audit,
            onStage: (stage) => onProgress({ type: "bundle", index, total, bundle: w.label, stage }) });
          bundles.push(outcome);
          onProgress({ type: "outcome", index, total, outcome });
        }
        const count = (st: BundleOutcome["status"]) => bundles.filter((b) => b.status === st).length;
        return { groupId, bundles, accepted: count("accepted"), alreadyImported: count("already-imported"), refused: count("refused") };
      } finally {
        discard();
      }
    };
    return { groupId, bundles: total, deposit, discard };
  } catch (err) {
    discard();
    throw err;
  }
}

/** An archive (or file) refused before any bundle in it was looked at: nothing was recorded. */
function refusedUpload(name: string, reason: string): BundleOutcome {
  return { bundle: name, status: "refused", reason, importId: null, file: name };
}

const joinName = (prefix: string | null, rel: string, name: string) => {
  const inner = rel ? `${rel}/${name}` : name;
  return prefix ? `${prefix}:${inner}` : inner;
};

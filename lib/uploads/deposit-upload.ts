import "server-only";
// POST /api/v1/imports end to end: receive, unpack safely, find bundles, deposit each; the upload's folder is always removed.
import fs from "node:fs";
import path from "node:path";
import type { AuditSource } from "@/lib/audit/record-audit";
import type { Identity } from "@/lib/auth/identity";
import { AppError } from "@/lib/errors";
import { UnpackBudget } from "./budget";
import { depositBundle, type BundleOutcome } from "./deposit-bundle";
import { findBundles, listFiles } from "./find-bundles";
import { uploadLimits, type UploadLimits } from "./limits";
import { makeUploadRoot, receiveUpload, type ReceivedFile } from "./receive-upload";
import { resolveUploadGroup } from "./upload-group";
import { looksLikeArchive, sniffKind } from "./sniff";
import { unpackTar } from "./unpack-tar";
import { unpackZip } from "./unpack-zip";

/** The answer to one upload: an outcome per bundle (or per archive that could not be unpacked) and the counts. */
export type UploadResult = { groupId: string; bundles: BundleOutcome[]; accepted: number; alreadyImported: number; refused: number };

/** Receive the upload in `req` as `who` and deposit every bundle in it (see docs/uploads.md). */
export async function depositUpload(req: Request, who: Identity, audit: AuditSource, limits: UploadLimits = uploadLimits()): Promise<UploadResult> {
  const root = makeUploadRoot(limits);
  try {
    const received = await receiveUpload(req, root, limits);
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
    for (const source of sources) {
      const found = findBundles(source.dir);
      if (found.length === 0 && source.prefix) bundles.push(refusedUpload(source.prefix, `${source.prefix}: holds no files`));
      for (const b of found) {
        const names = listFiles(b.dir).map((n) => joinName(source.prefix, b.rel, n));
        const label = source.prefix ? `${source.prefix}:${b.rel || "."}` : b.rel || "uploaded files";
        bundles.push(await depositBundle({ dir: b.dir, label, originalNames: names, groupId, uploaderId: who.userId, audit }));
      }
    }
    const count = (s: BundleOutcome["status"]) => bundles.filter((b) => b.status === s).length;
    return { groupId, bundles, accepted: count("accepted"), alreadyImported: count("already-imported"), refused: count("refused") };
  } finally {
    fs.rmSync(root, { recursive: true, force: true });
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

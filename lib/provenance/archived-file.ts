import "server-only";
// One archived file of a run, for download from its provenance page (the run's scope guards it).
import fs from "node:fs";
import { Readable } from "node:stream";
import { modelsFor } from "@/lib/db/models-for";
import { AppError } from "@/lib/errors";
import { resolveArchived } from "@/lib/storage/archive-path";

/** The bytes of archived file `sha256` as run `runId` names it; 404 when the run has no such file. */
export async function archivedFileResponse(runId: string, sha256: string): Promise<Response> {
  if (!/^[0-9a-f]{64}$/.test(sha256)) throw new AppError("invalid", `not a sha256: "${sha256}"`, { issues: [{ path: "sha256", message: "must be 64 lower-case hex digits" }] });
  const rows = (await modelsFor().sequelize.query(
    `SELECT ra.path, a.media_type AS "mediaType", a.storage_path AS "storagePath", a.bytes::text AS bytes
       FROM run_artifacts ra JOIN artifacts a ON a.sha256 = ra.artifact_sha256 WHERE ra.run_id = $1 AND ra.artifact_sha256 = $2 ORDER BY ra.path LIMIT 1`,
    { bind: [runId, sha256], type: "SELECT" })) as { path: string; mediaType: string; storagePath: string; bytes: string }[];
  const f = rows[0];
  if (!f) throw new AppError("not_found", `run ${runId} has no archived file ${sha256}`);
  const file = resolveArchived(f.storagePath);
  if (!fs.existsSync(file)) throw new AppError("not_found", `archived file ${f.path} (${sha256}) is missing from the archive`);
  const name = f.path.split("/").pop()!.replace(/[^A-Za-z0-9._-]/g, "_");
  return new Response(Readable.toWeb(fs.createReadStream(file)) as ReadableStream, {
    headers: { "content-type": f.mediaType || "application/octet-stream", "content-length": f.bytes, "content-disposition": `attachment; filename="${name}"`, "x-sha256": sha256 },
  });
}

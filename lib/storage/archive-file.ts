import "server-only";
// Archive a file: store it content-addressed on disk and record its Artifact row.
import type { Transaction } from "sequelize";
import { modelsFor } from "@/lib/db/models-for";
import { mediaTypeOf } from "./media-type";
import { storeFile, type StoredFile } from "./store-file";

/** An archived file as recorded on its Artifact row. */
export type ArchivedFile = StoredFile & { mediaType: string };

/** Options of {@link archiveFile}. */
export type ArchiveOptions = {
  transaction?: Transaction;
  /** Defaults to the type implied by the file name. */
  mediaType?: string;
  /** Name to derive the media type from, when `source` is a temporary path. */
  name?: string;
  expectSha256?: string;
  archiveDir?: string;
};

/**
 * Copy `source` into the archive (idempotent: the same content lands at the same path once) and
 * insert its Artifact row unless it exists. Inside a transaction that rolls back the row goes
 * with it; the file stays on disk, unreferenced, which is harmless for a content-addressed store.
 */
export async function archiveFile(source: string, options: ArchiveOptions = {}): Promise<ArchivedFile> {
  const stored = await storeFile(source, { archiveDir: options.archiveDir, expectSha256: options.expectSha256 });
  const mediaType = options.mediaType ?? mediaTypeOf(options.name ?? source);
  const { sequelize } = modelsFor(options.transaction);
  // ON CONFLICT DO NOTHING: two imports sharing a file (e.g. the same progress.json) may race here.
  await sequelize.query(
    `INSERT INTO artifacts (sha256, bytes, media_type, storage_path) VALUES ($1, $2, $3, $4) ON CONFLICT (sha256) DO NOTHING`,
    { bind: [stored.sha256, stored.bytes, mediaType, stored.storagePath], transaction: options.transaction },
  );
  return { ...stored, mediaType };
}

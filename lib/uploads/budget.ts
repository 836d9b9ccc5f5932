// What an upload may still unpack: files and bytes, shared by every archive and loose file in it.
import { Transform, type TransformCallback } from "node:stream";
import { AppError } from "@/lib/errors";
import { formatBytes, type UploadLimits } from "./limits";

/** A running count of files and unpacked bytes against the upload's limits. */
export class UnpackBudget {
  files = 0;
  bytes = 0;
  constructor(readonly limits: UploadLimits) {}

  /** Count one more file (refused beyond maxFiles). */
  addFile(where: string): void {
    this.files += 1;
    if (this.files > this.limits.maxFiles) {
      throw new AppError("too_large", `${where}: the upload holds more than ${this.limits.maxFiles} files (the limit per upload)`, { file: where, limit: this.limits.maxFiles });
    }
  }

  /** Reserve `n` declared bytes before unpacking them (refused beyond maxUnpackedBytes). */
  declare(n: number, where: string): void {
    if (this.bytes + n > this.limits.maxUnpackedBytes) {
      throw new AppError("too_large", `${where}: declares ${formatBytes(n)}, more than the ${formatBytes(this.limits.maxUnpackedBytes)} an upload may unpack to`, { file: where, limit: this.limits.maxUnpackedBytes });
    }
  }

  /**
   * A pass-through stream that counts the bytes actually unpacked for one entry and fails as
   * soon as they exceed what the entry declared or what the upload may still hold — the guard
   * against archives whose headers lie about sizes.
   */
  meter(where: string, declared: number | null): Transform {
    let seen = 0;
    return new Transform({
      transform: (chunk: Buffer, _enc: BufferEncoding, done: TransformCallback) => {
        seen += chunk.length;
        this.bytes += chunk.length;
        if (declared !== null && seen > declared) {
          return done(new AppError("invalid", `${where}: unpacks to more than the ${declared} bytes its header declares (a corrupt archive or a zip bomb)`, { file: where }));
        }
        if (this.bytes > this.limits.maxUnpackedBytes) {
          return done(new AppError("too_large", `${where}: the upload unpacks to more than ${formatBytes(this.limits.maxUnpackedBytes)} (the limit per upload)`, { file: where, limit: this.limits.maxUnpackedBytes }));
        }
        done(null, chunk);
      },
    });
  }
}

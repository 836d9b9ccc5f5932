import "server-only";
// Stream a request body to disk: multipart (busboy) with one or more files, or one raw archive body.
import crypto from "node:crypto";
import fs from "node:fs";
import path from "node:path";
import { Readable, Transform } from "node:stream";
import { pipeline } from "node:stream/promises";
import type { ReadableStream as WebReadableStream } from "node:stream/web";
import busboy from "busboy";
import { AppError } from "@/lib/errors";
import { formatBytes, type UploadLimits } from "./limits";
import { safeEntryPath } from "./safe-path";

/** One received file: where it is on disk and the name the uploader gave it (a relative path for folder uploads). */
export type ReceivedFile = { file: string; name: string; bytes: number };
/** A received upload: its private folder, its files and its form fields. */
export type Received = { root: string; files: ReceivedFile[]; fields: Record<string, string>; multipart: boolean };

const RAW_TYPES = ["application/zip", "application/x-zip-compressed", "application/gzip", "application/x-gzip", "application/x-tar", "application/octet-stream"];

/** Make the private folder of one upload under limits.dir. */
export function makeUploadRoot(limits: UploadLimits): string {
  fs.mkdirSync(limits.dir, { recursive: true });
  return fs.mkdtempSync(path.join(limits.dir, `upload-${crypto.randomBytes(3).toString("hex")}-`));
}

/** Stream `req`'s body into `root/incoming/`; the body may not exceed limits.maxBytes in all. */
export async function receiveUpload(req: Request, root: string, limits: UploadLimits): Promise<Received> {
  const type = (req.headers.get("content-type") ?? "").split(";")[0].trim().toLowerCase();
  const declared = Number(req.headers.get("content-length") ?? NaN);
  const tooLarge = () => new AppError("too_large", `the upload is larger than ${formatBytes(limits.maxBytes)}, the limit per upload`, { limit: limits.maxBytes });
  if (Number.isFinite(declared) && declared > limits.maxBytes) throw tooLarge();
  if (!req.body) throw new AppError("invalid", "the upload is empty: send the files of a result bundle, or one .zip or .tar.gz");
  const incoming = path.join(root, "incoming");
  fs.mkdirSync(incoming);
  const body = Readable.fromWeb(req.body as unknown as WebReadableStream);
  let total = 0;
  // Counts every body byte, whatever busboy makes of it: the size limit holds for the whole request.
  const counter = new Transform({
    transform(chunk: Buffer, _e, done) {
      total += chunk.length;
      done(total > limits.maxBytes ? tooLarge() : null, chunk);
    },
  });

  if (type === "multipart/form-data") return { root, multipart: true, ...(await receiveMultipart(req, body.pipe(counter), incoming, limits)) };
  if (RAW_TYPES.includes(type)) {
    const name = safeName(req.headers.get("x-file-name") ?? new URL(req.url).searchParams.get("name") ?? (type.includes("zip") ? "upload.zip" : "upload.tar.gz"));
    const file = path.join(incoming, "0");
    await pipeline(body, counter, fs.createWriteStream(file));
    return { root, files: total === 0 ? [] : [{ file, name, bytes: total }], fields: {}, multipart: false };
  }
  throw new AppError("bad_request", `content type "${type || "(none)"}" is not accepted: send multipart/form-data, application/zip or application/gzip`);
}

/** A display name for a raw body: the base name only. */
const safeName = (raw: string) => path.posix.basename(raw.replace(/\\/g, "/")).slice(0, 255) || "upload";

function receiveMultipart(req: Request, body: Readable, incoming: string, limits: UploadLimits): Promise<Omit<Received, "root" | "multipart">> {
  return new Promise((resolve, reject) => {
    const files: ReceivedFile[] = [];
    const fields: Record<string, string> = {};
    const writes: Promise<void>[] = [];
    let failed: unknown = null;
    const fail = (err: unknown) => { if (!failed) { failed = err; body.unpipe(); body.resume(); reject(err); } };
    const bb = busboy({
      headers: { "content-type": req.headers.get("content-type")! },
      preservePath: true, // folder uploads name files by their relative path; safeEntryPath checks them
      limits: { files: limits.maxFiles, fileSize: limits.maxBytes, fields: 20, fieldSize: 4096 },
    });
    bb.on("file", (_field, stream, info) => {
      const k = files.length;
      let name: string;
      try {
        name = info.filename ? safeEntryPath(incoming, info.filename, "upload") : `file-${k}`;
      } catch (err) {
        stream.resume();
        return fail(err);
      }
      const entry: ReceivedFile = { file: path.join(incoming, String(k)), name, bytes: 0 };
      files.push(entry);
      stream.on("data", (c: Buffer) => { entry.bytes += c.length; });
      writes.push(pipeline(stream, fs.createWriteStream(entry.file)).catch((err) => fail(err)));
    });
    bb.on("field", (name, value) => { fields[name] = value; });
    bb.on("filesLimit", () => fail(new AppError("too_large", `the upload holds more than ${limits.maxFiles} files (the limit per upload)`, { limit: limits.maxFiles })));
    bb.on("error", (err) => fail(err instanceof AppError ? err : new AppError("bad_request", `the multipart body could not be read (${(err as Error).message})`)));
    bb.on("close", () => {
      Promise.all(writes).then(() => { if (!failed) resolve({ files, fields }); }, fail);
    });
    body.on("error", fail);
    body.pipe(bb);
  });
}

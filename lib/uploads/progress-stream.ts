import "server-only";
// The NDJSON answer of POST /api/v1/imports: one line per progress step while the bundles are
// deposited, then {"type":"result","data":…} (or {"type":"error",…}); docs/uploads.md has the lines.
import { AppError, errorBody } from "@/lib/errors";
import type { log as baseLog } from "@/lib/log";
import type { PreparedUpload, UploadProgress } from "./deposit-upload";

/** Media type of the streamed answer. */
export const NDJSON = "application/x-ndjson";

/** One line of the stream: a progress step, the final result, or the error that ended it. */
export type ProgressLine = UploadProgress | { type: "result"; data: Awaited<ReturnType<PreparedUpload["deposit"]>> } | { type: "error"; error: { code: string; message: string } };

/**
 * Deposit `prepared`, streaming a line per step. The deposits go on if the client goes away: each
 * bundle is its own transaction, and stopping half-way would leave the upload's folder for nobody.
 */
export function progressStream(prepared: PreparedUpload, log: typeof baseLog): Response {
  const encoder = new TextEncoder();
  let open = true;
  const body = new ReadableStream<Uint8Array>({
    start(controller) {
      const send = (line: ProgressLine) => {
        if (!open) return;
        try { controller.enqueue(encoder.encode(`${JSON.stringify(line)}\n`)); } catch { open = false; }
      };
      prepared.deposit(send).then(
        (data) => send({ type: "result", data }),
        (err: unknown) => {
          if (!(err instanceof AppError)) log.error({ err }, "upload failed while depositing");
          const e = err instanceof AppError ? err : new AppError("internal", "the upload failed while importing; the server log has the details");
          send({ type: "error", error: errorBody(e).error });
        },
      ).finally(() => { if (open) { open = false; controller.close(); } });
    },
    cancel() { open = false; },
  });
  // no-transform: the server's compression would otherwise hold lines back until it has a block.
  return new Response(body, { status: 200, headers: { "content-type": `${NDJSON}; charset=utf-8`, "cache-control": "no-cache, no-transform", "x-accel-buffering": "no" } });
}

import "server-only";
// A request body holding a spec file, JSON or YAML (by content, whatever the content type says).
import { AppError } from "@/lib/errors";
import { env } from "@/lib/env";
import { parseSpec, type EnsembleSpec } from "@/lib/spec";

/**
 * Read the body under the size limit and parse it as a spec. Text, not readJson: a YAML file is
 * posted as it is (the CLI sends application/yaml); parseSpec tells JSON from YAML.
 */
export async function readSpecRequest(req: Request, limit = env.web.maxBodyBytes): Promise<EnsembleSpec> {
  const declared = Number(req.headers.get("content-length") ?? "0");
  if (declared > limit) throw new AppError("too_large", `request body is ${declared} bytes; the limit is ${limit}`);
  if (!req.body) throw new AppError("bad_request", "request body is empty; a spec (JSON or YAML) was expected");
  const reader = req.body.getReader();
  const parts: Uint8Array[] = [];
  let size = 0;
  for (;;) {
    const { done, value } = await reader.read();
    if (done) break;
    size += value.byteLength;
    if (size > limit) { await reader.cancel(); throw new AppError("too_large", `request body exceeds the limit of ${limit} bytes`); }
    parts.push(value);
  }
  return parseSpec(Buffer.concat(parts).toString("utf8"));
}

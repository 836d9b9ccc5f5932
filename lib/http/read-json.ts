import { AppError } from "../errors";
import { env } from "../env";
import { validate } from "../validation";

/** Read a request body as text under the size limit; `expected` says what an empty body lacked. */
export async function readBodyText(req: Request, limit = env.web.maxBodyBytes, expected = "a JSON object"): Promise<string> {
  const declared = Number(req.headers.get("content-length") ?? "0");
  if (declared > limit) throw new AppError("too_large", `request body is ${declared} bytes; the limit is ${limit}`);
  if (!req.body) throw new AppError("bad_request", `request body is empty; ${expected} was expected`);
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
  return Buffer.concat(parts).toString("utf8");
}

/** Read a JSON request body under the size limit, parse it, validate it against a schema. */
export async function readJson<T>(req: Request, schema: object, limit = env.web.maxBodyBytes): Promise<T> {
  const text = await readBodyText(req, limit);
  if (!text.trim()) throw new AppError("bad_request", "request body is empty; a JSON object was expected");
  let data: unknown;
  try { data = JSON.parse(text); } catch (err) {
    throw new AppError("bad_request", `request body is not valid JSON: ${(err as Error).message}`);
  }
  return validate<T>(schema, data, "request body");
}

// The spec hash: sha256 of the spec's canonical JSON, so key order and whitespace do not matter.
import crypto from "node:crypto";

/**
 * Canonical JSON: object keys sorted by code unit, no whitespace, numbers as JSON.stringify writes them.
 * Hand-written because no installed package does it; RFC 8785 differs only in corner cases of
 * number formatting and key order of non-BMP keys, which spec files do not use.
 */
export function canonicalJson(value: unknown): string {
  if (value === null || typeof value !== "object") {
    const s = JSON.stringify(value);
    if (s === undefined) throw new TypeError(`canonicalJson: ${typeof value} has no JSON form`);
    return s;
  }
  if (Array.isArray(value)) return `[${value.map(canonicalJson).join(",")}]`;
  const entries = Object.entries(value as Record<string, unknown>).filter(([, v]) => v !== undefined);
  entries.sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0));
  return `{${entries.map(([k, v]) => `${JSON.stringify(k)}:${canonicalJson(v)}`).join(",")}}`;
}

/** sha256 (hex) of the canonical JSON of a spec. */
export function specHash(spec: object): string {
  return crypto.createHash("sha256").update(canonicalJson(spec)).digest("hex");
}

// The explorer's query: its type, its JSON Schema, and its round trip through URL search params.
import { AppError, type FieldIssue } from "@/lib/errors";
import { validate } from "@/lib/validation";

/** One parameter filter: a closed range [min, max] (either end optional) or an exact value. */
export type ParamFilter = { name: string; min?: number; max?: number; eq?: number | string | boolean };

/** Columns a table may be sorted by; "param:<name>" sorts by a parameter's numeric value. */
export const SORT_COLUMNS = ["observable", "mean", "error", "tauInt", "n", "ensemble", "createdAt"] as const;

/** What the explorer asks for: filters, sort, page and visible columns (the view lives in the URL). */
export type ExplorerQuery = {
  sampler?: string;
  ensembleIds?: string[];
  tags?: string[];
  ownerIds?: string[];
  observable?: string;
  scope: "run" | "point";
  params: ParamFilter[];
  sort: { column: string; dir: "asc" | "desc" };
  page: number;
  pageSize: number;
  columns?: string[];
};

/** Parameter names: what the whitelist regex admits (and the Sampler table must also know). */
export const PARAM_NAME = /^[A-Za-z][A-Za-z0-9_]{0,31}$/;
const UUID = "^[0-9a-fA-F]{8}-[0-9a-fA-F]{4}-[0-9a-fA-F]{4}-[0-9a-fA-F]{4}-[0-9a-fA-F]{12}$";
const NAME = "^[A-Za-z0-9][A-Za-z0-9_.+-]{0,63}$";
export const MAX_PAGE_SIZE = 500;

/** JSON Schema (2020-12) of {@link ExplorerQuery}; saved views and exhibits store this shape. */
export const explorerQuerySchema = {
  $schema: "https://json-schema.org/draft/2020-12/schema",
  $id: "https://ergodex.invalid/schemas/explorer-query.json",
  type: "object",
  additionalProperties: false,
  required: ["scope", "params", "sort", "page", "pageSize"],
  properties: {
    sampler: { type: "string", pattern: NAME },
    ensembleIds: { type: "array", maxItems: 200, items: { type: "string", pattern: UUID } },
    tags: { type: "array", maxItems: 20, items: { type: "string", minLength: 1, maxLength: 64 } },
    ownerIds: { type: "array", maxItems: 50, items: { type: "string", pattern: UUID } },
    observable: { type: "string", pattern: NAME },
    scope: { enum: ["run", "point"] },
    params: {
      type: "array", maxItems: 16,
      items: {
        type: "object", additionalProperties: false, required: ["name"],
        properties: {
          name: { type: "string", pattern: PARAM_NAME.source },
          min: { type: "number" }, max: { type: "number" },
          eq: { anyOf: [{ type: "number" }, { type: "string", maxLength: 64 }, { type: "boolean" }] },
        },
      },
    },
    sort: {
      type: "object", additionalProperties: false, required: ["column", "dir"],
      properties: {
        column: { anyOf: [{ enum: [...SORT_COLUMNS] }, { type: "string", pattern: `^param:${PARAM_NAME.source.slice(1)}` }] },
        dir: { enum: ["asc", "desc"] },
      },
    },
    page: { type: "integer", minimum: 1, maximum: 1_000_000 },
    pageSize: { type: "integer", minimum: 1, maximum: MAX_PAGE_SIZE },
    columns: { type: "array", maxItems: 64, items: { type: "string", pattern: "^[A-Za-z][A-Za-z0-9_:]{0,40}$" } },
  },
} as const;

const DEFAULTS = { scope: "point", params: [], sort: { column: "createdAt", dir: "desc" }, page: 1, pageSize: 50 } as const;
const list = (v: string | null) => (v ? v.split(",").map((s) => s.trim()).filter(Boolean) : undefined);

/**
 * URL form: sampler, ensemble=<id,id>, tag=<t,t>, owner=<id,id>, observable, scope, sort=<column>,
 * dir, page, pageSize, columns=<a,b>, and one p.<name>=<min>..<max> | <min>.. | ..<max> | <value>
 * per parameter. Numbers that do not parse stay strings only for exact values; a range end must be a number.
 */
function fromSearchParams(sp: URLSearchParams, issues: FieldIssue[]): Record<string, unknown> {
  const out: Record<string, unknown> = {};
  const str = (k: string) => sp.get(k) || undefined;
  const int = (k: string) => {
    const raw = sp.get(k);
    if (raw === null || raw === "") return undefined;
    return /^-?\d+$/.test(raw) ? Number(raw) : raw; // a non-integer reaches the schema and is refused there
  };
  Object.assign(out, {
    sampler: str("sampler"), ensembleIds: list(sp.get("ensemble")), tags: list(sp.get("tag")), ownerIds: list(sp.get("owner")),
    observable: str("observable"), scope: str("scope"), page: int("page"), pageSize: int("pageSize"), columns: list(sp.get("columns")),
  });
  if (sp.get("sort") || sp.get("dir")) out.sort = { column: sp.get("sort") || DEFAULTS.sort.column, dir: sp.get("dir") || "asc" };
  const params: Record<string, unknown>[] = [];
  for (const [key, raw] of sp) {
    if (!key.startsWith("p.")) continue;
    const name = key.slice(2);
    const range = /^(.*)\.\.(.*)$/.exec(raw);
    if (range) {
      const f: Record<string, unknown> = { name };
      for (const [end, text] of [["min", range[1]], ["max", range[2]]] as const) {
        if (text === "") continue;
        const n = Number(text);
        if (!Number.isFinite(n)) issues.push({ path: `?${key}`, message: `range ${end} must be a finite number, got ${JSON.stringify(text)}` });
        else f[end] = n;
      }
      params.push(f);
    } else {
      const n = Number(raw);
      params.push({ name, eq: raw === "true" ? true : raw === "false" ? false : raw !== "" && Number.isFinite(n) ? n : raw });
    }
  }
  out.params = params;
  for (const k of Object.keys(out)) if (out[k] === undefined) delete out[k];
  return out;
}

/** Parse and validate an explorer query from URL search params or a JSON object; 422 names the field. */
export function parseExplorerQuery(input: URLSearchParams | Record<string, unknown>): ExplorerQuery {
  const issues: FieldIssue[] = [];
  const raw = input instanceof URLSearchParams ? fromSearchParams(input, issues) : { ...input };
  if (issues.length) throw new AppError("invalid", `query is invalid: ${issues.map((i) => `${i.path} ${i.message}`).join("; ")}`, { issues });
  const q = { ...DEFAULTS, params: [], sort: { ...DEFAULTS.sort }, ...raw } as unknown as ExplorerQuery;
  validate(explorerQuerySchema, q, "explorer query");
  for (const [i, f] of q.params.entries()) {
    if (f.eq !== undefined && (f.min !== undefined || f.max !== undefined)) issues.push({ path: `/params/${i}`, message: "give either eq or a range, not both" });
    if (f.eq === undefined && f.min === undefined && f.max === undefined) issues.push({ path: `/params/${i}`, message: "needs min, max or eq" });
    if (f.min !== undefined && f.max !== undefined && f.min > f.max) issues.push({ path: `/params/${i}`, message: `min ${f.min} is above max ${f.max}` });
  }
  if (issues.length) throw new AppError("invalid", `explorer query is invalid: ${issues.map((i) => `${i.path} ${i.message}`).join("; ")}`, { issues });
  return {
    ...q,
    ensembleIds: q.ensembleIds?.map((s) => s.toLowerCase()),
    ownerIds: q.ownerIds?.map((s) => s.toLowerCase()),
    // Canonical order (by name) so equal views compare equal and serialise to the same URL.
    params: q.params.map((f) => ({ ...f })).sort((a, b) => (a.name < b.name ? -1 : a.name > b.name ? 1 : 0)),
    sort: { ...q.sort },
  };
}

/** The URL search params of a query (canonical order, defaults left out), so a view can be bookmarked. */
export function toSearchParams(q: ExplorerQuery): URLSearchParams {
  const sp = new URLSearchParams();
  if (q.sampler) sp.set("sampler", q.sampler);
  if (q.ensembleIds?.length) sp.set("ensemble", [...q.ensembleIds].sort().join(","));
  if (q.tags?.length) sp.set("tag", [...q.tags].sort().join(","));
  if (q.ownerIds?.length) sp.set("owner", [...q.ownerIds].sort().join(","));
  if (q.observable) sp.set("observable", q.observable);
  if (q.scope !== DEFAULTS.scope) sp.set("scope", q.scope);
  for (const f of [...q.params].sort((a, b) => (a.name < b.name ? -1 : a.name > b.name ? 1 : 0))) {
    sp.append(`p.${f.name}`, f.eq !== undefined ? String(f.eq) : `${f.min ?? ""}..${f.max ?? ""}`);
  }
  if (q.sort.column !== DEFAULTS.sort.column || q.sort.dir !== DEFAULTS.sort.dir) { sp.set("sort", q.sort.column); sp.set("dir", q.sort.dir); }
  if (q.page !== DEFAULTS.page) sp.set("page", String(q.page));
  if (q.pageSize !== DEFAULTS.pageSize) sp.set("pageSize", String(q.pageSize));
  if (q.columns?.length) sp.set("columns", q.columns.join(","));
  return sp;
}

/** The canonical query string (what export headers and saved views record). */
export const canonicalQueryString = (q: ExplorerQuery): string => toSearchParams(q).toString();

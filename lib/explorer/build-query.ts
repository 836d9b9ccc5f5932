import "server-only";
// SQL of an explorer query over explorer.estimate_rows (the summary of current estimates, see
// migrations/20261202100000-create-explorer-rows.ts): every value, parameter names included, is a
// bind parameter; only whitelisted column expressions are ever written into the text.
import { QueryTypes } from "sequelize";
import { AppError } from "@/lib/errors";
import { visibleGroupIds } from "@/lib/auth/visible-groups";
import type { Identity } from "@/lib/auth/identity";
import { db } from "@/models";
import type { ExplorerQuery } from "./query";

/** Sort columns of explorer.estimate_rows (whitelist: these strings are the only ones interpolated); nullable ones sort missing last. */
const SORT_SQL: Record<string, { expr: string; nullable: boolean }> = {
  observable: { expr: "x.observable", nullable: false }, mean: { expr: "x.mean", nullable: false }, error: { expr: "x.error", nullable: false },
  tauInt: { expr: "x.tau_int", nullable: true }, n: { expr: "x.n", nullable: false }, ensemble: { expr: "x.ensemble_name", nullable: false },
  createdAt: { expr: "x.created_at", nullable: false },
};

/**
 * How a page is ordered. A sort key that may be missing is read in two parts, each an index walk:
 * rows that have it (by the key, then id), then the rest (by id; for a parameter, non-numeric values
 * in text order first, then rows without it) — "missing last" in both directions, with one index.
 */
export type SortPlan = { kind: "column"; expr: string; nullable: boolean } | { kind: "param"; nameRef: string };

/** WHERE over explorer.estimate_rows `x` (filters + group scope) with its binds, and the sort plan. */
export type BuiltQuery = { where: string; bind: unknown[]; whereBind: unknown[]; sort: SortPlan; dir: "ASC" | "DESC"; scopeRef: string };

/** A parameter's numeric value on the explorer row, or NULL when it is not a JSON number. */
export const numericParam = (ref: string) => `(CASE WHEN jsonb_typeof(x.params -> ${ref}) = 'number' THEN (x.params ->> ${ref})::double precision END)`;

/** Parameter names known to the parameter schemas of the registered samplers (the whitelist). */
export async function knownParamNames(): Promise<Set<string>> {
  const rows = await db().sequelize.query<{ name: string }>(
    `SELECT DISTINCT jsonb_object_keys(params_schema -> 'properties') AS name FROM samplers WHERE jsonb_typeof(params_schema -> 'properties') = 'object'`,
    { type: QueryTypes.SELECT },
  );
  return new Set(rows.map((r) => r.name));
}

/** Refuse parameter names (in filters, sort and x/groupBy) that no registered sampler has. */
export async function checkParamNames(names: string[], where: string): Promise<void> {
  if (names.length === 0) return;
  const known = await knownParamNames();
  const unknown = names.filter((n) => !known.has(n));
  if (unknown.length) {
    throw new AppError("invalid", `${where}: unknown parameter ${unknown.map((n) => JSON.stringify(n)).join(", ")}; known: ${[...known].sort().join(", ")}`,
      { issues: unknown.map((n) => ({ path: where, message: `unknown parameter ${n}` })) });
  }
}

/** Filters, group scope and sort of `q` for `who`, over the current estimates. */
export async function buildEstimateQuery(who: Identity, q: ExplorerQuery): Promise<BuiltQuery> {
  const sortParam = q.sort.column.startsWith("param:") ? q.sort.column.slice(6) : null;
  await checkParamNames([...q.params.map((f) => f.name), ...(sortParam ? [sortParam] : [])], "params");
  const bind: unknown[] = [];
  const ref = (v: unknown) => { bind.push(v); return `$${bind.length}`; };
  const scope = ref(q.scope);
  const where: string[] = [`x.scope = ${scope}`];
  const groups = visibleGroupIds(who);
  if (groups !== null) where.push(`x.group_id = ANY(${ref(groups)}::uuid[])`);
  if (q.sampler) where.push(`x.sampler_id IN (SELECT id FROM samplers WHERE name = ${ref(q.sampler)})`);
  if (q.ensembleIds?.length) where.push(`x.ensemble_id = ANY(${ref(q.ensembleIds)}::uuid[])`);
  if (q.tags?.length) where.push(`x.tags @> ${ref(q.tags)}::text[]`);
  if (q.ownerIds?.length) where.push(`x.owner_id = ANY(${ref(q.ownerIds)}::uuid[])`);
  if (q.observable) where.push(`x.observable = ${ref(q.observable)}`);
  for (const f of q.params) {
    const name = ref(f.name);
    if (f.eq !== undefined) {
      // jsonb containment, checked on the row: 16 matches 16 and 16.0, "wolff" only the string. (A GIN index
      // on params did not pay: a value shared by a fifth of the archive made its bitmap the slowest step.)
      where.push(`x.params @> jsonb_build_object(${name}::text, ${ref(JSON.stringify(f.eq))}::jsonb)`);
      continue;
    }
    // Checked on the row (cheap once the other filters or the sort index picked it); the CASE keeps a
    // string value ("hot") away from the cast.
    if (f.min !== undefined) where.push(`${numericParam(name)} >= ${ref(f.min)}::double precision`);
    if (f.max !== undefined) where.push(`${numericParam(name)} <= ${ref(f.max)}::double precision`);
  }
  // The sort's binds come last, so a count (WHERE only) passes just the WHERE ones.
  const whereBind = [...bind];
  const dir = q.sort.dir === "asc" ? "ASC" : "DESC";
  let sort: SortPlan;
  if (sortParam) sort = { kind: "param", nameRef: ref(sortParam) };
  else {
    const col = SORT_SQL[q.sort.column];
    if (!col) throw new AppError("invalid", `sort: unknown column ${JSON.stringify(q.sort.column)}`);
    sort = { kind: "column", ...col };
  }
  return { where: where.join(" AND "), bind, whereBind, sort, dir, scopeRef: scope };
}

/** One SQL statement and its binds. */
export type Sql = { sql: string; bind: unknown[] };

/**
 * The page's two parts: `head` (rows that have the sort key, in its order) and `tail` (the rest),
 * each `SELECT x.estimate_id … ORDER BY … OFFSET/LIMIT` given as placeholders $o and $l filled by the caller.
 */
export function pageParts(b: BuiltQuery): { head: (o: number, l: number) => Sql; tail: ((o: number, l: number) => Sql) | null; headCount: Sql | null } {
  const page = (o: number, l: number) => `OFFSET ${Math.trunc(o)} LIMIT ${Math.trunc(l)}`;
  const { where, bind, sort, dir, scopeRef } = b;
  if (sort.kind === "param") {
    const headFrom = `FROM explorer.param_values v JOIN explorer.estimate_rows x ON x.estimate_id = v.estimate_id
      WHERE v.scope = ${scopeRef} AND v.name = ${sort.nameRef} AND ${where}`;
    return {
      head: (o, l) => ({ sql: `SELECT x.estimate_id ${headFrom} ORDER BY v.num ${dir}, v.estimate_id ${dir} ${page(o, l)}`, bind }),
      headCount: { sql: `SELECT count(*) AS n ${headFrom}`, bind },
      tail: (o, l) => ({
        sql: `SELECT x.estimate_id FROM explorer.estimate_rows x WHERE ${where}
          AND NOT EXISTS (SELECT 1 FROM explorer.param_values v WHERE v.estimate_id = x.estimate_id AND v.name = ${sort.nameRef})
          ORDER BY x.params ->> ${sort.nameRef} ${dir} NULLS LAST, x.estimate_id ${dir} ${page(o, l)}`,
        bind,
      }),
    };
  }
  const key = sort.nullable ? ` AND ${sort.expr} IS NOT NULL` : "";
  return {
    head: (o, l) => ({ sql: `SELECT x.estimate_id FROM explorer.estimate_rows x WHERE ${where}${key} ORDER BY ${sort.expr} ${dir}, x.estimate_id ${dir} ${page(o, l)}`, bind: b.whereBind }),
    headCount: sort.nullable ? { sql: `SELECT count(*) AS n FROM explorer.estimate_rows x WHERE ${where}${key}`, bind: b.whereBind } : null,
    tail: sort.nullable
      ? (o, l) => ({ sql: `SELECT x.estimate_id FROM explorer.estimate_rows x WHERE ${where} AND ${sort.expr} IS NULL ORDER BY x.estimate_id ${dir} ${page(o, l)}`, bind: b.whereBind })
      : null,
  };
}

/** Ids of rows offset … offset+limit−1 of the query, in its order (head first, then tail). */
export async function pageIds(b: BuiltQuery, offset: number, limit: number): Promise<string[]> {
  const { sequelize } = db();
  const run = async (s: Sql) => (await sequelize.query<{ estimate_id: string }>(s.sql, { type: QueryTypes.SELECT, bind: s.bind })).map((r) => r.estimate_id);
  const parts = pageParts(b);
  const head = await run(parts.head(offset, limit));
  if (head.length === limit || !parts.tail) return head;
  // The head ran out on this page: it has offset + head.length rows, or (when empty) some number ≤ offset.
  let headTotal = offset + head.length;
  if (head.length === 0 && offset > 0) {
    const [{ n }] = await sequelize.query<{ n: string }>(parts.headCount!.sql, { type: QueryTypes.SELECT, bind: parts.headCount!.bind });
    headTotal = Number(n);
  }
  return [...head, ...(await run(parts.tail(Math.max(0, offset - headTotal), limit - head.length)))];
}

/**
 * Every matching row's id up to `limit`, in the query's order, in ONE statement: what exports and plots
 * read. A parameter sort joins its numeric values once (one pass over the matches beats the two index
 * walks of `pageIds` when all of them are read anyway).
 */
export async function allIds(b: BuiltQuery, limit: number): Promise<string[]> {
  const one = allIdsSql(b, limit);
  if (!one) return pageIds(b, 0, limit);
  const rows = await db().sequelize.query<{ estimate_id: string }>(one.sql, { type: QueryTypes.SELECT, bind: one.bind });
  return rows.map((r) => r.estimate_id);
}

/** The one statement of {@link allIds} for a parameter sort (null for a column sort, which walks `pageParts`). */
export function allIdsSql(b: BuiltQuery, limit: number): Sql | null {
  if (b.sort.kind !== "param") return null;
  const { where, bind, dir, sort } = b;
  return {
    sql: `SELECT x.estimate_id FROM explorer.estimate_rows x LEFT JOIN explorer.param_values v ON v.estimate_id = x.estimate_id AND v.name = ${sort.nameRef}
      WHERE ${where} ORDER BY v.num ${dir} NULLS LAST, (CASE WHEN v.num IS NULL THEN x.params ->> ${sort.nameRef} END) ${dir} NULLS LAST, x.estimate_id ${dir}
      LIMIT ${Math.trunc(limit)}`,
    bind,
  };
}

import "server-only";
// SQL of an explorer query: every value (parameter names included) is a bind parameter; only
// whitelisted column expressions are ever written into the text.
import { QueryTypes } from "sequelize";
import { AppError } from "@/lib/errors";
import { visibleGroupIds } from "@/lib/auth/visible-groups";
import type { Identity } from "@/lib/auth/identity";
import { db } from "@/models";
import type { ExplorerQuery } from "./query";

/** ORDER BY expressions of the fixed sort columns (whitelist: these strings are the only ones interpolated). */
const SORT_SQL: Record<string, string> = {
  observable: "es.observable", mean: "es.mean", error: "es.error", tauInt: "es.tau_int", n: "es.n",
  ensemble: "lower(e.name)", createdAt: "es.created_at",
};

/** A parameterised WHERE clause and its bind values; `bind` grows as `add` is called. */
export type BuiltQuery = { from: string; where: string; orderBy: string; bind: unknown[]; whereBind: unknown[] };

/**
 * A parameter's numeric value, or NULL when it is not a JSON number, so a string value ("wolff")
 * never reaches the cast and cannot make the query fail.
 */
export const numericParam = (ref: string) => `(CASE WHEN jsonb_typeof(es.params -> ${ref}) = 'number' THEN (es.params ->> ${ref})::double precision END)`;

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

/** FROM, WHERE (filters + group scope + current estimates only) and ORDER BY of `q` for `who`. */
export async function buildEstimateQuery(who: Identity, q: ExplorerQuery): Promise<BuiltQuery> {
  const sortParam = q.sort.column.startsWith("param:") ? q.sort.column.slice(6) : null;
  await checkParamNames([...q.params.map((f) => f.name), ...(sortParam ? [sortParam] : [])], "params");
  const bind: unknown[] = [];
  const ref = (v: unknown) => { bind.push(v); return `$${bind.length}`; };
  const where: string[] = ["es.is_current", `es.scope = ${ref(q.scope)}`];
  const groups = visibleGroupIds(who);
  if (groups !== null) where.push(`e.group_id = ANY(${ref(groups)}::uuid[])`);
  if (q.sampler) where.push(`s.name = ${ref(q.sampler)}`);
  if (q.ensembleIds?.length) where.push(`es.ensemble_id = ANY(${ref(q.ensembleIds)}::uuid[])`);
  if (q.tags?.length) where.push(`e.tags @> ${ref(q.tags)}::text[]`);
  if (q.ownerIds?.length) where.push(`e.owner_id = ANY(${ref(q.ownerIds)}::uuid[])`);
  if (q.observable) where.push(`es.observable = ${ref(q.observable)}`);
  for (const f of q.params) {
    const name = ref(f.name);
    if (f.eq !== undefined) {
      // jsonb containment (served by the GIN index on params): 16 matches 16 and 16.0, "wolff" only the string.
      where.push(`es.params @> jsonb_build_object(${name}::text, ${ref(JSON.stringify(f.eq))}::jsonb)`);
      continue;
    }
    if (f.min !== undefined) where.push(`${numericParam(name)} >= ${ref(f.min)}::double precision`);
    if (f.max !== undefined) where.push(`${numericParam(name)} <= ${ref(f.max)}::double precision`);
  }
  // ORDER BY's binds come last, so a count (no ORDER BY) passes only the WHERE ones.
  const whereBind = [...bind];
  const dir = q.sort.dir === "asc" ? "ASC" : "DESC";
  let orderBy: string;
  if (sortParam) {
    const name = ref(sortParam);
    // Numbers first in numeric order, then non-numeric values in text order, missing last.
    orderBy = `${numericParam(name)} ${dir} NULLS LAST, es.params ->> ${name} ${dir} NULLS LAST, es.id ${dir}`;
  } else {
    const expr = SORT_SQL[q.sort.column];
    if (!expr) throw new AppError("invalid", `sort: unknown column ${JSON.stringify(q.sort.column)}`);
    orderBy = `${expr} ${dir} NULLS LAST, es.id ${dir}`;
  }
  const from = `FROM estimates es JOIN ensembles e ON e.id = es.ensemble_id JOIN samplers s ON s.id = e.sampler_id
    JOIN users u ON u.id = e.owner_id JOIN parameter_points p ON p.id = es.point_id LEFT JOIN runs r ON r.id = es.run_id`;
  return { from, where: `WHERE ${where.join(" AND ")}`, orderBy: `ORDER BY ${orderBy}`, bind, whereBind };
}

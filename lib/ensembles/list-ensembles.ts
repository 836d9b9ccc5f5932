import "server-only";
// The ensembles table: server-side filter, sort and pagination within the caller's group scope.
import { QueryTypes } from "sequelize";
import { AppError } from "@/lib/errors";
import { db, ENSEMBLE_STATES, RUN_STATES } from "@/models";
import { visibleGroupIds } from "@/lib/auth/visible-groups";
import type { Identity } from "@/lib/auth/identity";

/** Columns the table may sort by (whitelist: they go into ORDER BY). */
export const ENSEMBLE_SORTS = {
  createdAt: "e.created_at", name: "lower(e.name)", state: "e.state", sampler: "s.name", owner: "lower(u.name)",
  runs: "run_total", reservedCoreHours: "e.reserved_core_hours", progress: "progress",
} as const;
export type EnsembleSort = keyof typeof ENSEMBLE_SORTS;

/** Filters and paging of the list (all optional). owner: a user id, or "me". */
export type EnsembleQuery = {
  state?: string; sampler?: string; owner?: string; tag?: string; q?: string;
  sort?: string; order?: string; page?: number; pageSize?: number;
};

export type EnsembleRow = {
  id: string; name: string; state: string; tags: string[]; createdAt: string; finishedAt: string | null;
  owner: { id: string; name: string }; group: { id: string; name: string }; sampler: { name: string; version: string };
  reservedCoreHours: number; runs: Record<string, number> & { total: number }; progress: number;
};

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

/** Parse URL search params into an EnsembleQuery, refusing unknown values with the parameter's name. */
export function ensembleQueryFrom(params: URLSearchParams): EnsembleQuery {
  const issues: { path: string; message: string }[] = [];
  const int = (name: string, min: number, max: number) => {
    const raw = params.get(name);
    if (raw === null || raw === "") return undefined;
    const n = Number(raw);
    if (!Number.isInteger(n) || n < min || n > max) { issues.push({ path: `?${name}`, message: `must be an integer from ${min} to ${max}` }); return undefined; }
    return n;
  };
  const q: EnsembleQuery = {
    state: params.get("state") || undefined, sampler: params.get("sampler") || undefined, owner: params.get("owner") || undefined,
    tag: params.get("tag") || undefined, q: params.get("q") || undefined, sort: params.get("sort") || undefined, order: params.get("order") || undefined,
    page: int("page", 1, 1_000_000), pageSize: int("pageSize", 1, 200),
  };
  if (q.state && !(ENSEMBLE_STATES as readonly string[]).includes(q.state)) issues.push({ path: "?state", message: `must be one of ${ENSEMBLE_STATES.join(", ")}` });
  if (q.sort && !Object.hasOwn(ENSEMBLE_SORTS, q.sort)) issues.push({ path: "?sort", message: `must be one of ${Object.keys(ENSEMBLE_SORTS).join(", ")}` });
  if (q.order && q.order !== "asc" && q.order !== "desc") issues.push({ path: "?order", message: "must be asc or desc" });
  if (q.owner && q.owner !== "me" && !UUID.test(q.owner)) issues.push({ path: "?owner", message: 'must be a user id or "me"' });
  if (issues.length) throw new AppError("invalid", `query is invalid: ${issues.map((i) => `${i.path} ${i.message}`).join("; ")}`, { issues });
  return q;
}

/** One page of the ensembles `who` may read, with run counts per state and mean progress. */
export async function listEnsembles(who: Identity, query: EnsembleQuery = {}): Promise<{ data: EnsembleRow[]; total: number; page: number; pageSize: number }> {
  const page = query.page ?? 1;
  const pageSize = query.pageSize ?? 25;
  const where: string[] = [];
  const bind: unknown[] = [];
  const add = (sql: string, value: unknown) => { bind.push(value); where.push(sql.replace("?", `$${bind.length}`)); };
  const groups = visibleGroupIds(who);
  if (groups !== null) add("e.group_id = ANY(?::uuid[])", groups);
  if (query.state) add("e.state = ?", query.state);
  if (query.sampler) add("s.name = ?", query.sampler);
  if (query.owner) add("e.owner_id = ?::uuid", query.owner === "me" ? who.userId : query.owner);
  if (query.tag) add("e.tags @> ARRAY[?::text]", query.tag);
  if (query.q) add("e.name ILIKE ?", `%${query.q.replace(/[\\%_]/g, (c) => `\\${c}`)}%`);
  const filter = where.length ? `WHERE ${where.join(" AND ")}` : "";
  const sort = ENSEMBLE_SORTS[(query.sort ?? "createdAt") as EnsembleSort];
  const order = query.order === "asc" ? "ASC" : "DESC";
  const counts = RUN_STATES.map((s) => `count(*) FILTER (WHERE r.state = '${s}') AS "n_${s}"`).join(", ");
  const { sequelize } = db();
  const from = `FROM ensembles e JOIN samplers s ON s.id = e.sampler_id JOIN users u ON u.id = e.owner_id JOIN groups g ON g.id = e.group_id
    LEFT JOIN LATERAL (SELECT count(*) AS run_total, coalesce(avg(r.progress), 0) AS progress, ${counts} FROM runs r WHERE r.ensemble_id = e.id) rc ON true`;
  const [{ total }] = await sequelize.query<{ total: string }>(`SELECT count(*) AS total ${from} ${filter}`, { type: QueryTypes.SELECT, bind });
  const rows = await sequelize.query<Record<string, unknown>>(
    `SELECT e.id, e.name, e.state, e.tags, e.created_at, e.finished_at, e.reserved_core_hours, e.owner_id, u.name AS owner_name,
            e.group_id, g.name AS group_name, s.name AS sampler_name, s.version AS sampler_version, rc.*
     ${from} ${filter} ORDER BY ${sort} ${order}, e.id ${order} LIMIT ${pageSize} OFFSET ${(page - 1) * pageSize}`,
    { type: QueryTypes.SELECT, bind },
  );
  const data = rows.map((r): EnsembleRow => ({
    id: r.id as string, name: r.name as string, state: r.state as string, tags: r.tags as string[],
    createdAt: new Date(r.created_at as string).toISOString(), finishedAt: r.finished_at ? new Date(r.finished_at as string).toISOString() : null,
    owner: { id: r.owner_id as string, name: r.owner_name as string }, group: { id: r.group_id as string, name: r.group_name as string },
    sampler: { name: r.sampler_name as string, version: r.sampler_version as string }, reservedCoreHours: Number(r.reserved_core_hours),
    runs: { total: Number(r.run_total), ...Object.fromEntries(RUN_STATES.map((s) => [s, Number(r[`n_${s}`])])) },
    progress: Number(r.progress),
  }));
  return { data, total: Number(total), page, pageSize };
}

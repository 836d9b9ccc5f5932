import "server-only";
// The audit log as PIs (their led groups) and admins (everything) read it: filtered, paged, exportable as CSV.
import type { Identity } from "@/lib/auth/identity";
import { modelsFor } from "@/lib/db/models-for";
import { AppError } from "@/lib/errors";

/** Filters of the audit view; every value is bound, never spliced into SQL. */
export type AuditFilter = { actor?: string; action?: string; target?: string; from?: string; to?: string; page?: number; pageSize?: number };
/** One audit line with the actor's name. */
export type AuditRow = { id: string; createdAt: Date; actorId: string | null; actorName: string | null; action: string; targetType: string; targetId: string | null; groupId: string | null; ip: string | null; requestId: string | null; detail: Record<string, unknown> };

const date = (v: string | undefined, key: string): Date | undefined => {
  if (!v) return undefined;
  const d = new Date(v);
  if (Number.isNaN(d.getTime())) throw new AppError("invalid", `?${key} must be a date (ISO 8601), got "${v}"`, { issues: [{ path: `?${key}`, message: "is not a date" }] });
  return d;
};

/** Parse the filter out of a URL's search params. */
export function parseAuditFilter(sp: URLSearchParams): AuditFilter {
  const int = (k: string, max: number) => {
    const raw = sp.get(k);
    if (!raw) return undefined;
    const n = Number(raw);
    if (!Number.isInteger(n) || n < 1 || n > max) throw new AppError("invalid", `?${k} must be an integer from 1 to ${max}`, { issues: [{ path: `?${k}`, message: `must be an integer from 1 to ${max}` }] });
    return n;
  };
  const f: AuditFilter = { page: int("page", 1_000_000), pageSize: int("pageSize", 10_000) };
  for (const k of ["actor", "action", "target", "from", "to"] as const) { const v = sp.get(k)?.trim(); if (v) f[k] = v; }
  date(f.from, "from"); date(f.to, "to");
  return f;
}

/** Audit entries `who` may read (a PI: groups they lead; an admin: all), newest first. */
export async function listAudit(who: Identity, f: AuditFilter): Promise<{ rows: AuditRow[]; total: number; page: number; pageSize: number }> {
  if (who.role !== "admin" && who.role !== "pi") throw new AppError("forbidden", "the audit log is for PIs and admins");
  const bind: unknown[] = [];
  const where: string[] = [];
  const add = (sql: (n: number) => string, v: unknown) => { bind.push(v); where.push(sql(bind.length)); };
  if (who.role !== "admin") add((n) => `a.group_id = ANY($${n}::uuid[])`, who.leadGroupIds);
  // actor: an id, or part of a name or e-mail
  if (f.actor) add((n) => `(a.actor_id::text = $${n}::text OR u.name ILIKE '%' || $${n}::text || '%' OR u.email ILIKE '%' || $${n}::text || '%')`, f.actor);
  if (f.action) add((n) => `a.action LIKE $${n}::text || '%'`, f.action);
  if (f.target) add((n) => `(a.target_id = $${n}::text OR a.target_type = $${n}::text)`, f.target);
  if (f.from) add((n) => `a.created_at >= $${n}`, date(f.from, "from"));
  if (f.to) add((n) => `a.created_at <= $${n}`, date(f.to, "to"));
  const w = where.length ? `WHERE ${where.join(" AND ")}` : "";
  const page = f.page ?? 1, pageSize = f.pageSize ?? 50;
  const { sequelize } = modelsFor();
  const from = `FROM audit_entries a LEFT JOIN users u ON u.id = a.actor_id ${w}`;
  const [{ n }] = (await sequelize.query(`SELECT count(*)::int AS n ${from}`, { bind, type: "SELECT" })) as { n: number }[];
  const rows = (await sequelize.query(
    `SELECT a.id::text AS id, a.created_at AS "createdAt", a.actor_id AS "actorId", u.name AS "actorName", a.action, a.target_type AS "targetType",
            a.target_id AS "targetId", a.group_id AS "groupId", a.ip, a.request_id AS "requestId", a.detail
       ${from} ORDER BY a.created_at DESC, a.id DESC LIMIT ${pageSize} OFFSET ${(page - 1) * pageSize}`, { bind, type: "SELECT" })) as AuditRow[];
  return { rows, total: n, page, pageSize };
}

const cell = (s: string) => (/[",\n\r]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s);

/** Audit rows as CSV (times in UTC ISO 8601; detail as JSON). */
export function auditCsv(rows: AuditRow[]): string {
  const head = ["time_utc", "actor_id", "actor", "action", "target_type", "target_id", "group_id", "ip", "request_id", "detail"];
  return [head.join(","), ...rows.map((r) => [new Date(r.createdAt).toISOString(), r.actorId ?? "", r.actorName ?? "", r.action, r.targetType, r.targetId ?? "", r.groupId ?? "", r.ip ?? "", r.requestId ?? "", JSON.stringify(r.detail)].map((c) => cell(String(c))).join(","))].join("\n") + "\n";
}

import "server-only";
// The imports list of the Archive page: who, when, original names, state, reason, the run; within the caller's scope.
import { QueryTypes } from "sequelize";
import type { Identity } from "@/lib/auth/identity";
import { visibleGroupIds } from "@/lib/auth/visible-groups";
import { AppError } from "@/lib/errors";
import { db } from "@/models";

/** One row of the imports list. */
export type ImportRow = {
  id: string; createdAt: string; source: string; state: string; rejectReason: string | null; bundleHash: string;
  originalNames: string[]; uploadedBy: { id: string; name: string } | null;
  run: { id: string; ensembleId: string; ensembleName: string; groupId: string } | null;
};

/** Filters of the list: source, state, and paging. */
export type ImportQuery = { source?: string; state?: string; page?: number; pageSize?: number };

/** Parse ?source=&state=&page=&pageSize=, refusing unknown values by name. */
export function importQueryFrom(p: URLSearchParams): ImportQuery {
  const issues: { path: string; message: string }[] = [];
  const one = (name: string, allowed: string[]) => {
    const v = p.get(name) || undefined;
    if (v && !allowed.includes(v)) issues.push({ path: `?${name}`, message: `must be one of ${allowed.join(", ")}` });
    return v;
  };
  const int = (name: string, max: number) => {
    const raw = p.get(name);
    if (!raw) return undefined;
    const n = Number(raw);
    if (!Number.isInteger(n) || n < 1 || n > max) { issues.push({ path: `?${name}`, message: `must be an integer from 1 to ${max}` }); return undefined; }
    return n;
  };
  const q = { source: one("source", ["cluster", "upload"]), state: one("state", ["accepted", "rejected"]), page: int("page", 1_000_000), pageSize: int("pageSize", 200) };
  if (issues.length) throw new AppError("invalid", `query is invalid: ${issues.map((i) => `${i.path} ${i.message}`).join("; ")}`, { issues });
  return q;
}

/**
 * Imports `who` may see, newest first: those of runs in their groups, and their own uploads
 * (a refused upload has no run, so only its uploader — and coordinators and admins — see it).
 */
export async function listImports(who: Identity, q: ImportQuery = {}): Promise<{ data: ImportRow[]; total: number; page: number; pageSize: number }> {
  const page = q.page ?? 1;
  const pageSize = q.pageSize ?? 50;
  const bind: unknown[] = [];
  const where: string[] = [];
  const add = (sql: string, v: unknown) => { bind.push(v); where.push(sql.replaceAll("?", `$${bind.length}`)); };
  const groups = visibleGroupIds(who);
  if (groups !== null) {
    bind.push(groups, who.userId);
    where.push(`(e.group_id = ANY($${bind.length - 1}::uuid[]) OR i.uploaded_by_id = $${bind.length}::uuid)`);
  }
  if (q.source) add("i.source = ?", q.source);
  if (q.state) add("i.state = ?", q.state);
  const filter = where.length ? `WHERE ${where.join(" AND ")}` : "";
  const from = `FROM imports i LEFT JOIN runs r ON r.id = i.run_id LEFT JOIN ensembles e ON e.id = r.ensemble_id LEFT JOIN users u ON u.id = i.uploaded_by_id`;
  const { sequelize } = db();
  const [{ total }] = await sequelize.query<{ total: number }>(`SELECT count(*)::int AS total ${from} ${filter}`, { bind, type: QueryTypes.SELECT });
  const rows = await sequelize.query<Record<string, any>>( // eslint-disable-line @typescript-eslint/no-explicit-any
    `SELECT i.id, i.created_at, i.source, i.state, i.reject_reason, i.bundle_hash, i.original_names, i.uploaded_by_id, u.name AS uploader_name,
            r.id AS run_id, e.id AS ensemble_id, e.name AS ensemble_name, e.group_id
     ${from} ${filter} ORDER BY i.created_at DESC, i.id DESC LIMIT ${pageSize} OFFSET ${(page - 1) * pageSize}`,
    { bind, type: QueryTypes.SELECT },
  );
  return {
    total, page, pageSize,
    data: rows.map((r) => ({
      id: r.id, createdAt: new Date(r.created_at).toISOString(), source: r.source, state: r.state, rejectReason: r.reject_reason,
      bundleHash: r.bundle_hash, originalNames: r.original_names ?? [],
      uploadedBy: r.uploaded_by_id ? { id: r.uploaded_by_id, name: r.uploader_name ?? "(removed)" } : null,
      run: r.run_id ? { id: r.run_id, ensembleId: r.ensemble_id, ensembleName: r.ensemble_name, groupId: r.group_id } : null,
    })),
  };
}

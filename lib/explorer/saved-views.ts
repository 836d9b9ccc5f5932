import "server-only";
// Saved explorer views: created by a person for one of their groups, read by that group's members.
import { Op } from "sequelize";
import { recordAudit, type AuditSource } from "@/lib/audit/record-audit";
import type { Identity } from "@/lib/auth/identity";
import { checkScope } from "@/lib/auth/scope";
import { visibleGroupIds } from "@/lib/auth/visible-groups";
import { AppError } from "@/lib/errors";
import { validate } from "@/lib/validation";
import { db, type SavedView } from "@/models";
import { checkParamNames } from "./build-query";
import { parsePlotSpec } from "./plot-series";
import { canonicalQueryString, parseExplorerQuery } from "./query";

/** JSON Schema of POST /api/v1/views; `query` is checked in full by parseExplorerQuery. */
export const savedViewBodySchema = {
  type: "object", additionalProperties: false, required: ["name", "query"],
  properties: {
    name: { type: "string", minLength: 1, maxLength: 200 },
    query: { type: "object" },
    groupId: { type: "string", format: "uuid" },
    plot: {
      type: "object", additionalProperties: false, required: ["x", "groupBy"],
      properties: { x: { type: "string" }, groupBy: { type: "string" }, logX: { type: "boolean" }, logY: { type: "boolean" } },
    },
  },
} as const;

/** A view as the API returns it. */
export function viewJson(v: SavedView) {
  return { id: v.id, name: v.name, query: v.query, plot: v.plot, queryString: v.queryString, ownerId: v.ownerId, groupId: v.groupId, createdAt: v.createdAt, updatedAt: v.updatedAt };
}

/** Save a view for `who`, shared with `groupId` (default: their only or first group; they must belong to it unless coordinator/admin). */
export async function createSavedView(audit: AuditSource, who: Identity, body: unknown) {
  const b = validate<{ name: string; query: Record<string, unknown>; groupId?: string; plot?: { x: string; groupBy: string; logX?: boolean; logY?: boolean } }>(savedViewBodySchema, body, "view");
  let query;
  try { query = parseExplorerQuery(b.query); } catch (err) {
    if (err instanceof AppError && err.details?.issues) {
      throw new AppError("invalid", `view query is invalid: ${err.message}`, { issues: err.details.issues.map((i) => ({ path: `/query${i.path.startsWith("/") ? i.path : `/${i.path}`}`, message: i.message })) });
    }
    throw err;
  }
  await checkParamNames(query.params.map((p) => p.name), "/query/params");
  if (b.plot) {
    const spec = parsePlotSpec(b.plot);
    await checkParamNames([spec.x, ...(spec.groupBy.startsWith("param:") ? [spec.groupBy.slice(6)] : [])], "/plot");
  }
  const groupId = b.groupId?.toLowerCase() ?? who.groupIds[0];
  if (!groupId) throw new AppError("invalid", "groupId: you belong to no group; name the group to share the view with", { issues: [{ path: "/groupId", message: "is required" }] });
  const group = await db().Group.findByPk(groupId);
  if (!group) throw new AppError("invalid", "groupId: no such group", { issues: [{ path: "/groupId", message: "no such group" }] });
  checkScope(who, { type: "group", id: groupId, groupId }, "read");
  const view = await db().sequelize.transaction(async (transaction) => {
    const v = await db().SavedView.create({ name: b.name, query: query as unknown as Record<string, unknown>, plot: b.plot ?? null,
      queryString: canonicalQueryString(query), ownerId: who.userId, groupId }, { transaction });
    await recordAudit(audit, "view.create", { type: "saved_view", id: v.id, groupId }, { name: v.name, queryString: v.queryString }, transaction);
    return v;
  });
  return viewJson(view);
}

/** The views `who` may read (their groups' views and their own), newest first. */
export async function listSavedViews(who: Identity, opts: { page?: number; pageSize?: number } = {}) {
  const groups = visibleGroupIds(who);
  const where = groups === null ? {} : { [Op.or]: [{ groupId: groups }, { ownerId: who.userId }] };
  const page = opts.page ?? 1;
  const pageSize = opts.pageSize ?? 50;
  const { rows, count } = await db().SavedView.findAndCountAll({ where, order: [["createdAt", "DESC"], ["id", "DESC"]], limit: pageSize, offset: (page - 1) * pageSize });
  return { data: rows.map(viewJson), total: count, page, pageSize };
}

/** The scope target of a view (its group and owner), or null when there is none with that id. */
export async function savedViewTarget(id: string) {
  if (!/^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i.test(id)) return null;
  const v = await db().SavedView.findByPk(id);
  return v ? { type: "saved view", id: v.id, groupId: v.groupId, ownerId: v.ownerId } : null;
}

/** One view by id (the route's guard checked the scope). */
export async function getSavedView(id: string) {
  const v = await db().SavedView.findByPk(id.toLowerCase());
  if (!v) throw new AppError("not_found", "saved view not found");
  return viewJson(v);
}

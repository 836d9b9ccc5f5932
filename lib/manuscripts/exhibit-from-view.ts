import "server-only";
// An exhibit's input from what a form or API client sends: a saved explorer view (by id) or a query built by hand.
import type { Identity } from "@/lib/auth/identity";
import { checkScope } from "@/lib/auth/scope";
import { AppError } from "@/lib/errors";
import { getSavedView, savedViewTarget } from "@/lib/explorer/saved-views";
import type { ExhibitInput } from "./edit-manuscript";
import type { ExhibitQuery } from "./exhibit-query";

/** What POST …/exhibits and the add-exhibit action accept. */
export type ExhibitBody = { label: string; caption?: string | null; kind: "figure" | "table"; viewId?: string; query?: Record<string, unknown> };

/** JSON Schema of {@link ExhibitBody}: a viewId or a query (the query itself is checked by addExhibit). */
export const exhibitBodySchema = {
  type: "object", additionalProperties: false, required: ["label", "kind"],
  properties: {
    label: { type: "string", minLength: 1, maxLength: 80 }, caption: { type: ["string", "null"], maxLength: 2000 }, kind: { enum: ["figure", "table"] },
    viewId: { type: "string", format: "uuid" }, query: { type: "object" },
  },
} as const;

/** Resolve a saved view (which `who` must be able to read) into the exhibit's query; the plot's x and grouping travel with it. */
export async function exhibitFromBody(who: Identity, body: ExhibitBody): Promise<ExhibitInput> {
  if (!body.viewId === !body.query) throw new AppError("invalid", "send either viewId (a saved explorer view) or query, not both or neither", { issues: [{ path: "/viewId", message: "either viewId or query is required" }] });
  if (!body.viewId) return { label: body.label, caption: body.caption ?? null, kind: body.kind, query: (body.query ?? {}) as ExhibitQuery };
  const target = await savedViewTarget(body.viewId);
  if (!target) throw new AppError("invalid", "viewId: no such saved view", { issues: [{ path: "/viewId", message: "no such saved view" }] });
  checkScope(who, target, "read");
  const view = await getSavedView(body.viewId);
  const plot = (view.plot ?? {}) as { x?: string; groupBy?: string };
  const query = { ...(view.query as Record<string, unknown>), ...(plot.x ? { x: plot.x } : {}), ...(plot.groupBy ? { groupBy: plot.groupBy } : {}) } as ExhibitQuery;
  return { label: body.label, caption: body.caption ?? null, kind: body.kind, query, viewId: view.id };
}

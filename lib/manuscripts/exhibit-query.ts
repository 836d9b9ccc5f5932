import "server-only";
// The query behind an exhibit and the estimates it selects (the subset of the explorer's query a frozen exhibit needs).
import type { Transaction } from "sequelize";
import { modelsFor } from "@/lib/db/models-for";

/** Which estimates an exhibit shows: current ones of these ensembles (of the manuscript's group), one observable, optional parameter ranges. */
export type ExhibitQuery = {
  ensembleIds?: string[]; observable?: string; scope?: "run" | "point";
  params?: { name: string; min?: number; max?: number; eq?: string | number }[];
  x?: string; groupBy?: string; viewId?: string;
};

/** JSON Schema (2020-12) of {@link ExhibitQuery}; other keys of a saved view (sort, page, plot options) are allowed and ignored. */
export const exhibitQuerySchema = {
  type: "object",
  properties: {
    ensembleIds: { type: "array", items: { type: "string", format: "uuid" }, maxItems: 200 },
    observable: { type: "string", pattern: "^[A-Za-z][A-Za-z0-9_]{0,31}$" },
    scope: { enum: ["run", "point"] },
    params: { type: "array", maxItems: 20, items: { type: "object", required: ["name"], properties: {
      name: { type: "string", pattern: "^[A-Za-z][A-Za-z0-9_]{0,31}$" }, min: { type: "number" }, max: { type: "number" }, eq: { oneOf: [{ type: "string" }, { type: "number" }] },
    }, additionalProperties: false } },
    x: { type: "string" }, groupBy: { type: "string" }, viewId: { type: "string" },
  },
  additionalProperties: true,
} as const;

/** Ids of the current estimates an exhibit's query selects within group `groupId`, ordered by ensemble, params and observable. */
export async function selectExhibitEstimates(groupId: string, q: ExhibitQuery, transaction?: Transaction): Promise<string[]> {
  const bind: unknown[] = [groupId, q.scope ?? "point"];
  const where = [`en.group_id = $1`, `e.scope = $2`, `e.is_current`];
  if (q.ensembleIds?.length) { bind.push(q.ensembleIds); where.push(`e.ensemble_id = ANY($${bind.length})`); }
  if (q.observable) { bind.push(q.observable); where.push(`e.observable = $${bind.length}`); }
  for (const p of q.params ?? []) {
    // the name is pattern-checked above and bound as a value: never spliced into the SQL
    bind.push(p.name); const n = bind.length;
    if (p.eq !== undefined) { bind.push(String(p.eq)); where.push(`e.params ->> $${n} = $${bind.length}`); }
    if (p.min !== undefined) { bind.push(p.min); where.push(`(e.params ->> $${n})::float8 >= $${bind.length}`); }
    if (p.max !== undefined) { bind.push(p.max); where.push(`(e.params ->> $${n})::float8 <= $${bind.length}`); }
  }
  const rows = (await modelsFor(transaction).sequelize.query(
    `SELECT e.id FROM estimates e JOIN ensembles en ON en.id = e.ensemble_id WHERE ${where.join(" AND ")}
      ORDER BY en.created_at, e.params::text, e.observable, e.run_id NULLS FIRST`, { bind, transaction, type: "SELECT" })) as { id: string }[];
  return rows.map((r) => r.id);
}

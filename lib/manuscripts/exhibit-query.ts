import "server-only";
// The query behind an exhibit and the estimates it selects: the explorer's filters (a saved view's query is
// stored as is), read with the explorer's own semantics so a frozen exhibit holds exactly what its view showed.
import type { Transaction } from "sequelize";
import { modelsFor } from "@/lib/db/models-for";

/** Which estimates an exhibit shows: current ones of the manuscript's group matching the explorer's filters. */
export type ExhibitQuery = {
  sampler?: string; ensembleIds?: string[]; tags?: string[]; ownerIds?: string[]; observable?: string; scope?: "run" | "point";
  params?: { name: string; min?: number; max?: number; eq?: string | number | boolean }[];
  x?: string; groupBy?: string; viewId?: string;
};

const NAME = "^[A-Za-z][A-Za-z0-9_]{0,31}$";
/** JSON Schema (2020-12) of {@link ExhibitQuery}; other keys of a saved view (sort, page, plot options) are allowed and ignored. */
export const exhibitQuerySchema = {
  type: "object",
  properties: {
    sampler: { type: "string", maxLength: 100 },
    ensembleIds: { type: "array", items: { type: "string", format: "uuid" }, maxItems: 200 },
    tags: { type: "array", items: { type: "string", maxLength: 100 }, maxItems: 50 },
    ownerIds: { type: "array", items: { type: "string", format: "uuid" }, maxItems: 200 },
    observable: { type: "string", pattern: NAME },
    scope: { enum: ["run", "point"] },
    params: { type: "array", maxItems: 20, items: { type: "object", required: ["name"], properties: {
      name: { type: "string", pattern: NAME }, min: { type: "number" }, max: { type: "number" }, eq: { oneOf: [{ type: "string" }, { type: "number" }, { type: "boolean" }] },
    }, additionalProperties: false } },
    x: { type: "string" }, groupBy: { type: "string" }, viewId: { type: "string" },
  },
  additionalProperties: true,
} as const;

// the explorer's guard (lib/explorer/build-query.ts): a string value never reaches the cast
const numeric = (n: string) => `CASE WHEN jsonb_typeof(e.params -> ${n}) = 'number' THEN (e.params ->> ${n})::double precision END`;

/** Ids of the current estimates an exhibit's query selects within group `groupId`, ordered by ensemble, params and observable. */
export async function selectExhibitEstimates(groupId: string, q: ExhibitQuery, transaction?: Transaction): Promise<string[]> {
  const bind: unknown[] = [];
  const ref = (v: unknown) => { bind.push(v); return `$${bind.length}`; };
  const where = [`en.group_id = ${ref(groupId)}`, `e.scope = ${ref(q.scope ?? "point")}`, `e.is_current`];
  if (q.sampler) where.push(`s.name = ${ref(q.sampler)}`);
  if (q.ensembleIds?.length) where.push(`e.ensemble_id = ANY(${ref(q.ensembleIds)}::uuid[])`);
  if (q.tags?.length) where.push(`en.tags @> ${ref(q.tags)}::text[]`);
  if (q.ownerIds?.length) where.push(`en.owner_id = ANY(${ref(q.ownerIds)}::uuid[])`);
  if (q.observable) where.push(`e.observable = ${ref(q.observable)}`);
  for (const p of q.params ?? []) {
    // the name is pattern-checked above and bound as a value: never spliced into the SQL
    const n = ref(p.name);
    if (p.eq !== undefined) { where.push(`e.params @> jsonb_build_object(${n}::text, ${ref(JSON.stringify(p.eq))}::jsonb)`); continue; }
    if (p.min !== undefined) where.push(`${numeric(n)} >= ${ref(p.min)}::double precision`);
    if (p.max !== undefined) where.push(`${numeric(n)} <= ${ref(p.max)}::double precision`);
  }
  const rows = (await modelsFor(transaction).sequelize.query(
    `SELECT e.id FROM estimates e JOIN ensembles en ON en.id = e.ensemble_id JOIN samplers s ON s.id = en.sampler_id WHERE ${where.join(" AND ")}
      ORDER BY en.created_at, e.params::text, e.observable, e.run_id NULLS FIRST`, { bind, transaction, type: "SELECT" })) as { id: string }[];
  return rows.map((r) => r.id);
}

// The part of a PROV document an element rests on: walking back from it through wasGeneratedBy (entity → the
// activity that made it), used (activity → its inputs), wasAssociatedWith (activity → its agents) and
// activity-less wasDerivedFrom (run.json → spec). An estimate's page shows only this, not the whole run.
import { RELATIONS, type ProvDocument, type ProvValue } from "./prov-document";

const text = (v: ProvValue | undefined): string => (v === undefined ? "" : typeof v === "object" ? v.$ : String(v));
const ENDS: Record<(typeof RELATIONS)[number], [string, string]> = {
  used: ["prov:activity", "prov:entity"], wasGeneratedBy: ["prov:entity", "prov:activity"], wasAssociatedWith: ["prov:activity", "prov:agent"],
  wasDerivedFrom: ["prov:generatedEntity", "prov:usedEntity"], wasAttributedTo: ["prov:entity", "prov:agent"],
};

/** `doc` cut down to `id` and everything it was made from, by and with (relations kept where both ends are). */
export function ancestry(doc: ProvDocument, id: string): ProvDocument {
  const keep = new Set([id]);
  const stack = [id];
  const back = (rel: (typeof RELATIONS)[number], from: string, guard?: (r: Record<string, ProvValue>) => boolean) => {
    const [a, b] = ENDS[rel];
    for (const r of Object.values(doc[rel])) {
      if (text(r[a]) === from && (!guard || guard(r)) && !keep.has(text(r[b]))) { keep.add(text(r[b])); stack.push(text(r[b])); }
    }
  };
  while (stack.length) {
    const x = stack.pop()!;
    back("wasGeneratedBy", x);
    back("used", x);
    back("wasAssociatedWith", x);
    back("wasAttributedTo", x);
    back("wasDerivedFrom", x, (r) => r["prov:activity"] === undefined);
  }
  const out: ProvDocument = { ...doc, entity: {}, activity: {}, agent: {}, used: {}, wasGeneratedBy: {}, wasAssociatedWith: {}, wasDerivedFrom: {}, wasAttributedTo: {} };
  for (const kind of ["entity", "activity", "agent"] as const) for (const [k, v] of Object.entries(doc[kind])) if (keep.has(k)) out[kind][k] = v;
  for (const rel of RELATIONS) {
    const [a, b] = ENDS[rel];
    for (const [k, r] of Object.entries(doc[rel])) if (keep.has(text(r[a])) && keep.has(text(r[b]))) out[rel][k] = r;
  }
  return out;
}

// A plain listing of a PROV-JSON document for people who do not read PROV: one row per element and per relation.
import { RELATIONS, type ProvDocument, type ProvValue } from "./prov-document";

/** One line of the listing. */
export type ListingRow = { kind: string; id: string; type: string; label: string; from: string; to: string; details: string };

const text = (v: ProvValue | undefined): string => (v === undefined ? "" : typeof v === "object" ? v.$ : String(v));

// The two ends of each relation, in reading order "from → to" (the thing made → what it came from or who).
const ENDS: Record<(typeof RELATIONS)[number], [string, string]> = {
  used: ["prov:activity", "prov:entity"],
  wasGeneratedBy: ["prov:entity", "prov:activity"],
  wasAssociatedWith: ["prov:activity", "prov:agent"],
  wasDerivedFrom: ["prov:generatedEntity", "prov:usedEntity"],
  wasAttributedTo: ["prov:entity", "prov:agent"],
};

/** Elements then relations, each with its type, label and remaining attributes as "key=value; …". */
export function provListing(doc: ProvDocument): ListingRow[] {
  const rows: ListingRow[] = [];
  for (const kind of ["entity", "activity", "agent"] as const) {
    for (const [id, attrs] of Object.entries(doc[kind])) {
      const { "prov:type": type, "prov:label": label, ...rest } = attrs;
      rows.push({ kind, id, type: text(type), label: text(label), from: "", to: "", details: Object.entries(rest).map(([k, v]) => `${k}=${text(v)}`).join("; ") });
    }
  }
  for (const kind of RELATIONS) {
    const [a, b] = ENDS[kind];
    for (const [id, attrs] of Object.entries(doc[kind])) {
      const { [a]: from, [b]: to, ...rest } = attrs;
      rows.push({ kind, id, type: "", label: "", from: text(from), to: text(to), details: Object.entries(rest).map(([k, v]) => `${k}=${text(v)}`).join("; ") });
    }
  }
  return rows;
}

const cell = (s: string) => (/[",\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s);

/** The listing as CSV with a header line. */
export function provListingCsv(doc: ProvDocument): string {
  const cols: (keyof ListingRow)[] = ["kind", "id", "type", "label", "from", "to", "details"];
  return [cols.join(","), ...provListing(doc).map((r) => cols.map((c) => cell(r[c])).join(","))].join("\n") + "\n";
}

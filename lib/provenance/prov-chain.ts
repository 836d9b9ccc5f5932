// A PROV-JSON document as a readable chain: each activity in time order with who took part (and as what),
// what it used and what it generated, every element with its facts and the page it links to.
import type { ProvDocument, ProvValue } from "./prov-document";
import { displayLabel, hrefOf } from "./prov-graph";

/** One element in the chain. */
export type ChainItem = { id: string; label: string; type: string; href: string | null; facts: [string, string][]; role?: string };
/** One activity with its agents and entities. */
export type ChainStep = ChainItem & { start: string | null; agents: ChainItem[]; used: ChainItem[]; generated: ChainItem[] };

const text = (v: ProvValue | undefined): string => (v === undefined ? "" : typeof v === "object" ? v.$ : String(v));
/** Attributes not worth a line (the label and type are shown already; documents are behind the PROV-JSON link). */
const HIDDEN = new Set(["prov:type", "prov:label", "ergodex:document"]);
const NAMES: Record<string, string> = {
  "prov:startTime": "start", "prov:endTime": "end", "prov:location": "where", "prov:time": "time", "ergodex:thermCut": "thermalisation cut",
  "ergodex:cutChoice": "cut chosen", "ergodex:chosenAt": "cut chosen at", "ergodex:importerVersion": "importer version",
  "ergodex:analysisVersion": "analysis version", "ergodex:originalNames": "original file names", "ergodex:codeHash": "code hash",
  "ergodex:specHash": "spec hash", "ergodex:bundleHash": "bundle sha256", "ergodex:exitCode": "exit code", "ergodex:tauInt": "τ_int",
  "ergodex:mediaType": "media type", "ergodex:isCurrent": "current", "ergodex:chi2dof": "χ²/dof",
};
const nameOf = (k: string) => NAMES[k] ?? k.replace(/^(ergodex|prov):/, "");

/** The chain of `doc`; `people` says whether person links (to the audit trail) are offered. */
export function provChain(doc: ProvDocument, options: { people?: boolean } = {}): ChainStep[] {
  const runOfFile = new Map<string, string>();
  for (const r of Object.values(doc.wasGeneratedBy)) {
    const e = text(r["prov:entity"]), a = text(r["prov:activity"]);
    if (e.startsWith("file:") && a.startsWith("run:")) runOfFile.set(e.slice(5), a.slice(4));
  }
  const item = (element: "entity" | "activity" | "agent", id: string, role?: ProvValue): ChainItem => {
    const attrs = doc[element][id] ?? {};
    const facts = Object.entries(attrs).filter(([k]) => !HIDDEN.has(k)).map(([k, v]): [string, string] => [nameOf(k), text(v)]);
    return { id, label: displayLabel(doc, element, id), type: text(attrs["prov:type"]), href: hrefOf(id, element, { runOfFile, people: options.people }), facts, ...(role ? { role: text(role).replace(/^ergodex:/, "") } : {}) };
  };
  const steps = new Map<string, ChainStep>();
  for (const id of Object.keys(doc.activity)) {
    steps.set(id, { ...item("activity", id), start: text(doc.activity[id]["prov:startTime"]) || null, agents: [], used: [], generated: [] });
  }
  const push = (list: ChainItem[], x: ChainItem) => { if (!list.some((y) => y.id === x.id && y.role === x.role)) list.push(x); };
  for (const r of Object.values(doc.wasAssociatedWith)) { const s = steps.get(text(r["prov:activity"])); if (s) push(s.agents, item("agent", text(r["prov:agent"]), r["prov:role"])); }
  for (const r of Object.values(doc.used)) { const s = steps.get(text(r["prov:activity"])); if (s) push(s.used, item("entity", text(r["prov:entity"]))); }
  for (const r of Object.values(doc.wasGeneratedBy)) { const s = steps.get(text(r["prov:activity"])); if (s) push(s.generated, item("entity", text(r["prov:entity"]))); }
  // Time order; activities without a time (none today) last. Within one instant, runs before imports before derivations.
  const rank = (id: string) => (id.startsWith("run:") ? 0 : id.startsWith("imp:") ? 1 : 2);
  return [...steps.values()].sort((a, b) => (a.start ?? "9999").localeCompare(b.start ?? "9999") || rank(a.id) - rank(b.id) || a.id.localeCompare(b.id));
}

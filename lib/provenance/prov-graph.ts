// A PROV-JSON document as a graph for the provenance pages: nodes with a label, a few facts and the page each
// one links to, edges drawn in the direction things happened (cause → effect), and a layered layout.
import { concise } from "@/lib/format";
import type { ProvDocument, ProvValue } from "./prov-document";

/** What a node is, for its shape and colour. */
export type NodeKind = "person" | "software" | "input" | "activity" | "file" | "series" | "estimate" | "other";
/** One node of the graph. */
export type GraphNode = { id: string; element: "entity" | "activity" | "agent"; kind: NodeKind; type: string; label: string; href: string | null; facts: [string, string][]; layer: number; row: number };
/** One edge, from the earlier thing to the later one. */
export type GraphEdge = { from: string; to: string; relation: string; role?: string };
/** The laid-out graph. */
export type ProvGraph = { nodes: GraphNode[]; edges: GraphEdge[]; layers: number; rows: number; compact: boolean };

const text = (v: ProvValue | undefined): string => (v === undefined ? "" : typeof v === "object" ? v.$ : String(v));

/**
 * The label a person reads: an estimate in concise notation (full values stay in the facts and the PROV-JSON),
 * a derivation named after what it derived, an import by its short id.
 */
export function displayLabel(doc: ProvDocument, element: "entity" | "activity" | "agent", id: string): string {
  const attrs = doc[element][id] ?? {};
  const mean = attrs["ergodex:mean"], error = attrs["ergodex:error"];
  if (element === "entity" && typeof mean === "number" && typeof error === "number") return `${text(attrs["ergodex:observable"])} = ${concise(mean, error)}`;
  if (attrs["prov:label"] !== undefined) return text(attrs["prov:label"]);
  if (element === "activity" && id.endsWith("/derivation")) {
    const est = doc.entity[id.slice(0, -"/derivation".length)];
    return `${text(est?.["ergodex:scope"]) === "point" ? "combination" : "analysis"} of ${text(est?.["ergodex:observable"]) || "an estimate"}`;
  }
  if (id.startsWith("imp:")) return `import ${id.slice(4, 12)}`;
  return id;
}
const after = (id: string, prefix: string) => id.slice(prefix.length).split("/")[0];

/** The page an element links to: run, ensemble, estimate, archived file download, series analysis, the person's audit trail. */
export function hrefOf(id: string, element: string, context: { runOfFile?: Map<string, string>; people?: boolean }): string | null {
  if (id.startsWith("run:")) return id.endsWith("/run.json") ? `/provenance/runs/${after(id, "run:")}` : `/runs/${after(id, "run:")}`;
  if (id.startsWith("ens:")) return `/provenance/ensembles/${after(id, "ens:")}`;
  if (id.startsWith("est:")) return `/provenance/estimates/${after(id, "est:")}`;
  if (id.startsWith("series:")) {
    const [run, obs] = id.slice("series:".length).split("/");
    return `/runs/${run}/analysis?observable=${encodeURIComponent(obs)}`;
  }
  if (id.startsWith("file:")) {
    const sha = id.slice("file:".length);
    const run = context.runOfFile?.get(sha);
    return run ? `/api/v1/provenance/runs/${run}/files/${sha}` : null;
  }
  if (id.startsWith("user:") && element === "agent") return context.people ? `/audit?actor=${after(id, "user:")}` : null;
  if (id.startsWith("imp:")) return "/archive";
  return null;
}

function kindOf(element: string, type: string): NodeKind {
  if (type === "prov:Person") return "person";
  if (type === "prov:SoftwareAgent") return "software";
  if (element === "activity") return "activity";
  if (type === "ergodex:ArchivedFile") return "file";
  if (type === "ergodex:Series") return "series";
  if (type === "ergodex:Estimate") return "estimate";
  if (type === "ergodex:RunInput" || type === "ergodex:SamplerCode" || type === "ergodex:EnsembleSpec") return "input";
  return "other";
}

/** Facts shown under a node's label: hashes, versions, cut and window, times. */
const FACTS: [string, string][] = [
  ["ergodex:sha256", "sha256"], ["ergodex:commit", "commit"], ["ergodex:codeHash", "code hash"], ["ergodex:specHash", "spec hash"], ["ergodex:seed", "seed"],
  ["ergodex:importerVersion", "importer"], ["ergodex:analysisVersion", "analysis"], ["ergodex:method", "method"], ["ergodex:thermCut", "cut"], ["ergodex:window", "window"],
  ["ergodex:cutChoice", "cut chosen"], ["ergodex:chosenAt", "chosen at"], ["ergodex:originalNames", "uploaded as"], ["ergodex:bytes", "bytes"],
  ["prov:location", "where"], ["prov:startTime", "start"], ["prov:endTime", "end"], ["ergodex:exitCode", "exit code"], ["ergodex:role", "role"],
];

/**
 * Nodes and edges of `doc`, layered by longest path from the sources. With more than `maxNodes` nodes the graph
 * is compacted: run estimates, series, files and derivation activities are left out (the chain lists them), and
 * point estimates hang off the runs through wasDerivedFrom.
 */
export function provGraph(doc: ProvDocument, options: { maxNodes?: number; people?: boolean } = {}): ProvGraph {
  const runOfFile = new Map<string, string>();
  for (const r of Object.values(doc.wasGeneratedBy)) {
    const e = text(r["prov:entity"]), a = text(r["prov:activity"]);
    if (e.startsWith("file:") && a.startsWith("run:")) runOfFile.set(e.slice(5), a.slice(4));
  }
  let nodes: GraphNode[] = [];
  for (const element of ["agent", "entity", "activity"] as const) {
    for (const [id, attrs] of Object.entries(doc[element])) {
      const type = text(attrs["prov:type"]);
      const facts = FACTS.filter(([k]) => attrs[k] !== undefined).map(([k, name]): [string, string] => [name, text(attrs[k])]);
      nodes.push({ id, element, kind: kindOf(element, type), type, label: displayLabel(doc, element, id), href: hrefOf(id, element, { runOfFile, people: options.people }), facts, layer: 0, row: 0 });
    }
  }
  // A derivation activity is drawn as part of the estimate it made (its page is the estimate's): one column fewer,
  // and what it used and who chose its cut point at the estimate itself.
  const fold = new Map<string, string>();
  for (const n of nodes) if (n.element === "activity" && n.id.endsWith("/derivation")) fold.set(n.id, n.id.slice(0, -"/derivation".length));
  nodes = nodes.filter((n) => !fold.has(n.id));
  const compact = nodes.length > (options.maxNodes ?? 70);
  if (compact) {
    const scopeOf = (id: string) => text(doc.entity[id]?.["ergodex:scope"]);
    nodes = nodes.filter((n) => !(n.kind === "series" || n.kind === "file" || (n.kind === "estimate" && scopeOf(n.id) === "run") || n.id.startsWith("imp:")));
  }
  const keep = new Set(nodes.map((n) => n.id));
  const edges: GraphEdge[] = [];
  const add = (rawFrom: string, rawTo: string, relation: string, role?: ProvValue) => {
    const from = fold.get(rawFrom) ?? rawFrom, to = fold.get(rawTo) ?? rawTo;
    if (edges.some((e) => e.from === from && e.to === to)) return;
    if (keep.has(from) && keep.has(to) && from !== to) edges.push({ from, to, relation, ...(role ? { role: text(role) } : {}) });
  };
  for (const r of Object.values(doc.used)) add(text(r["prov:entity"]), text(r["prov:activity"]), "used");
  for (const r of Object.values(doc.wasGeneratedBy)) add(text(r["prov:activity"]), text(r["prov:entity"]), "wasGeneratedBy");
  for (const r of Object.values(doc.wasAssociatedWith)) add(text(r["prov:agent"]), text(r["prov:activity"]), "wasAssociatedWith", r["prov:role"]);
  // Derivations without an activity of their own (run.json ← spec, manuscript ← exhibit) would otherwise float free.
  for (const r of Object.values(doc.wasDerivedFrom)) if (r["prov:activity"] === undefined) add(text(r["prov:usedEntity"]), text(r["prov:generatedEntity"]), "wasDerivedFrom");
  if (compact) {
    // Point estimate ← run estimates ← series ← run: with the middle left out, tie each point estimate to its runs.
    const runsOf = new Map<string, Set<string>>();
    for (const r of Object.values(doc.wasDerivedFrom)) {
      const g = text(r["prov:generatedEntity"]), u = text(r["prov:usedEntity"]);
      if (u.startsWith("est:")) {
        const runId = text(doc.entity[u]?.["ergodex:scope"]) === "run" ? runOfEstimate(doc, u) : null;
        if (runId) (runsOf.get(g) ?? runsOf.set(g, new Set()).get(g)!).add(runId);
      }
    }
    for (const [est, runs] of runsOf) for (const run of runs) add(run, est, "wasDerivedFrom");
  }
  layout(nodes, edges);
  return { nodes, edges, layers: Math.max(0, ...nodes.map((n) => n.layer)) + 1, rows: Math.max(0, ...nodes.map((n) => n.row)) + 1, compact };
}

/** The run activity whose series a run estimate was derived from. */
function runOfEstimate(doc: ProvDocument, est: string): string | null {
  for (const r of Object.values(doc.wasDerivedFrom)) {
    if (text(r["prov:generatedEntity"]) === est) {
      const used = text(r["prov:usedEntity"]);
      if (used.startsWith("series:")) return `run:${used.slice("series:".length).split("/")[0]}`;
    }
  }
  return null;
}

/** Longest-path layering (sources at 0), then rows in order of first appearance per layer. */
function layout(nodes: GraphNode[], edges: GraphEdge[]): void {
  const byId = new Map(nodes.map((n) => [n.id, n]));
  // PROV statements here never form a cycle; the pass limit keeps a malformed document from looping.
  for (let pass = 0; pass < nodes.length; pass++) {
    let moved = false;
    for (const e of edges) {
      const a = byId.get(e.from)!, b = byId.get(e.to)!;
      if (b.layer < a.layer + 1) { b.layer = a.layer + 1; moved = true; }
    }
    if (!moved) break;
  }
  const rows = new Map<number, number>();
  for (const n of nodes) { n.row = rows.get(n.layer) ?? 0; rows.set(n.layer, n.row + 1); }
}

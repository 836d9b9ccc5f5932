// A small builder for PROV-JSON documents: elements by kind, relations with generated blank ids.

/** An attribute value as PROV-JSON writes it (plain, or a typed literal). */
export type ProvValue = string | number | boolean | { $: string; type: string };
/** Attributes of an element or relation, keyed by qualified name. */
export type ProvAttrs = Record<string, ProvValue | undefined | null>;

/** The relation kinds Ergodex emits. */
export const RELATIONS = ["used", "wasGeneratedBy", "wasAssociatedWith", "wasDerivedFrom", "wasAttributedTo"] as const;
export type RelationKind = (typeof RELATIONS)[number];

/** A PROV-JSON document (the members Ergodex fills). */
export type ProvDocument = {
  prefix: Record<string, string>;
  entity: Record<string, Record<string, ProvValue>>;
  activity: Record<string, Record<string, ProvValue>>;
  agent: Record<string, Record<string, ProvValue>>;
} & { [K in RelationKind]: Record<string, Record<string, ProvValue>> };

/** Namespaces of the identifiers Ergodex writes; "ergodex" holds our own attribute names. */
export const PREFIXES: Record<string, string> = {
  ergodex: "https://ergodex.invalid/ns#",
  xsd: "http://www.w3.org/2001/XMLSchema#",
  prov: "http://www.w3.org/ns/prov#",
  run: "https://ergodex.invalid/runs/",
  ens: "https://ergodex.invalid/ensembles/",
  est: "https://ergodex.invalid/estimates/",
  series: "https://ergodex.invalid/series/",
  file: "urn:sha256:",
  imp: "https://ergodex.invalid/imports/",
  user: "https://ergodex.invalid/people/",
  sampler: "https://ergodex.invalid/samplers/",
  ms: "https://ergodex.invalid/manuscripts/",
  exhibit: "https://ergodex.invalid/exhibits/",
};

/** An xsd:dateTime literal, or undefined for a missing time. */
export const dateTime = (d: Date | string | null | undefined): string | undefined => (d ? new Date(d).toISOString() : undefined);
/** A qualified-name literal (for prov:type values). */
export const qn = (name: string): ProvValue => ({ $: name, type: "xsd:QName" });

function clean(attrs: ProvAttrs): Record<string, ProvValue> {
  const out: Record<string, ProvValue> = {};
  for (const [k, v] of Object.entries(attrs)) if (v !== undefined && v !== null) out[k] = v;
  return out;
}

/** Collects elements and relations; adding an element twice merges its attributes, a relation twice is kept once. */
export class ProvBuilder {
  readonly doc: ProvDocument = {
    prefix: { ...PREFIXES }, entity: {}, activity: {}, agent: {},
    used: {}, wasGeneratedBy: {}, wasAssociatedWith: {}, wasDerivedFrom: {}, wasAttributedTo: {},
  };
  private seen = new Set<string>();
  private counter = 0;

  /** Add (or extend) an entity. */
  entity(id: string, attrs: ProvAttrs = {}): string { return this.element("entity", id, attrs); }
  /** Add (or extend) an activity. */
  activity(id: string, attrs: ProvAttrs = {}): string { return this.element("activity", id, attrs); }
  /** Add (or extend) an agent. */
  agent(id: string, attrs: ProvAttrs = {}): string { return this.element("agent", id, attrs); }

  /** Add a relation with its named arguments (prov:entity, prov:activity, …) unless the same one exists. */
  relate(kind: RelationKind, args: ProvAttrs): void {
    const body = clean(args);
    const key = kind + JSON.stringify(body);
    if (this.seen.has(key)) return;
    this.seen.add(key);
    this.doc[kind][`_:${kind[0]}${kind.slice(1, 3)}${++this.counter}`] = body;
  }

  private element(kind: "entity" | "activity" | "agent", id: string, attrs: ProvAttrs): string {
    this.doc[kind][id] = { ...this.doc[kind][id], ...clean(attrs) };
    return id;
  }
}

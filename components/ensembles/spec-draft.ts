// The new-ensemble form's state and its translation into a spec ("ergodex.ensemble/1").
// Inputs stay strings while typed; a value that is not a number is sent as the string it is,
// so the server's validation names the field ("must be number") instead of a silent NaN.

/** A sampler as the form offers it: its parameters come from its JSON Schema. */
export type SamplerOption = { name: string; version: string; description: string | null; paramsSchema: ParamsSchema };
export type ParamsSchema = { properties?: Record<string, ParamSchema>; required?: string[] };
export type ParamSchema = { type?: string; enum?: (string | number)[]; default?: unknown; description?: string; minimum?: number; maximum?: number; exclusiveMinimum?: number };

export type ScanDraft = { param: string; kind: "linear" | "log" | "values"; from: string; to: string; points: string; values: string };

export type Draft = {
  name: string; description: string; sampler: string; // "name@version"
  fixed: Record<string, string>; scan: ScanDraft[];
  replicas: string; thermalization: string; measurements: string; interval: string; seed: string;
  cores: string; wallMinutes: string; memoryMb: string;
  maxAttempts: string; retryOn: string[]; resumeOnWallTime: boolean;
  onFailure: boolean; onDone: boolean; tags: string;
};

export const samplerKey = (s: { name: string; version: string }) => `${s.name}@${s.version}`;

/** A fresh 64-bit-ish master seed in decimal (the user may type their own). */
export function randomSeed(): string {
  const a = new Uint32Array(2);
  crypto.getRandomValues(a);
  return ((BigInt(a[0]) << 32n) | BigInt(a[1])).toString();
}

/** A blank draft for a sampler: required enum parameters start at their first choice. */
export function blankDraft(s: SamplerOption | undefined, seed: string): Draft {
  const fixed: Record<string, string> = {};
  for (const [k, p] of Object.entries(s?.paramsSchema.properties ?? {})) if (p.enum && s?.paramsSchema.required?.includes(k)) fixed[k] = String(p.enum[0]);
  return {
    name: "", description: "", sampler: s ? samplerKey(s) : "", fixed, scan: [],
    replicas: "2", thermalization: "1000", measurements: "10000", interval: "1", seed,
    cores: "1", wallMinutes: "30", memoryMb: "512", maxAttempts: "1", retryOn: [], resumeOnWallTime: false,
    onFailure: true, onDone: false, tags: "",
  };
}

const toNumber = (v: string): number | string => (v.trim() !== "" && Number.isFinite(Number(v)) ? Number(v) : v);
const toCount = (v: string): number | string => (/^\s*-?\d+\s*$/.test(v) ? Number(v) : v);

/** A parameter's typed value from its input text, per the sampler's schema. */
export function paramValue(p: ParamSchema | undefined, raw: string): string | number | boolean {
  if (p?.type === "integer" || p?.type === "number") return toNumber(raw);
  if (p?.enum && p.enum.every((e) => typeof e === "number")) return toNumber(raw);
  if (p?.type === "boolean") return raw === "true";
  return raw;
}

/** The spec the draft describes; blank optional inputs are left out so the spec's defaults apply. */
export function draftToSpec(d: Draft, samplers: SamplerOption[]): Record<string, unknown> {
  const s = samplers.find((x) => samplerKey(x) === d.sampler);
  const props = s?.paramsSchema.properties ?? {};
  const scanned = new Set(d.scan.map((a) => a.param));
  const fixed: Record<string, unknown> = {};
  for (const [k, v] of Object.entries(d.fixed)) if (v.trim() !== "" && !scanned.has(k)) fixed[k] = paramValue(props[k], v);
  const scan = d.scan.map((a) => {
    if (a.kind === "values") return { param: a.param, values: a.values.split(",").map((x) => x.trim()).filter(Boolean).map((x) => paramValue(props[a.param], x)) };
    return { param: a.param, [a.kind]: { from: toNumber(a.from), to: toNumber(a.to), points: toCount(a.points) } };
  });
  const [name, version] = d.sampler.split("@");
  return {
    format: "ergodex.ensemble/1",
    name: d.name,
    ...(d.description.trim() ? { description: d.description } : {}),
    sampler: { name: name ?? "", version: version ?? "" },
    fixed, scan,
    replicas: toCount(d.replicas), thermalization: toCount(d.thermalization), measurements: toCount(d.measurements), interval: toCount(d.interval),
    seed: d.seed.trim(),
    resources: { cores: toCount(d.cores), wallMinutes: toCount(d.wallMinutes), ...(d.memoryMb.trim() ? { memoryMb: toCount(d.memoryMb) } : {}) },
    retry: { maxAttempts: toCount(d.maxAttempts), on: d.retryOn, resumeOnWallTime: d.resumeOnWallTime },
    notify: { onFailure: d.onFailure, onDone: d.onDone },
    tags: d.tags.split(/[,\s]+/).map((t) => t.trim()).filter(Boolean),
  };
}

/** A draft filled from a spec (the example, or a pasted file taken into the form). */
export function specToDraft(spec: Record<string, any>, seed: string): Draft {
  const str = (v: unknown, dflt = "") => (v === undefined || v === null ? dflt : String(v));
  return {
    name: str(spec.name), description: str(spec.description), sampler: spec.sampler ? `${spec.sampler.name}@${spec.sampler.version}` : "",
    fixed: Object.fromEntries(Object.entries(spec.fixed ?? {}).map(([k, v]) => [k, str(v)])),
    scan: (spec.scan ?? []).map((a: any): ScanDraft => {
      const kind = a.values ? "values" : a.log ? "log" : "linear";
      const ax = a[kind] ?? {};
      return { param: a.param, kind, from: str(ax.from), to: str(ax.to), points: str(ax.points), values: kind === "values" ? a.values.join(", ") : "" };
    }),
    replicas: str(spec.replicas, "1"), thermalization: str(spec.thermalization, "0"), measurements: str(spec.measurements, "1000"), interval: str(spec.interval, "1"),
    seed: str(spec.seed, seed),
    cores: str(spec.resources?.cores, "1"), wallMinutes: str(spec.resources?.wallMinutes, "30"), memoryMb: str(spec.resources?.memoryMb),
    maxAttempts: str(spec.retry?.maxAttempts, "1"), retryOn: spec.retry?.on ?? [], resumeOnWallTime: Boolean(spec.retry?.resumeOnWallTime),
    onFailure: spec.notify?.onFailure ?? true, onDone: Boolean(spec.notify?.onDone), tags: (spec.tags ?? []).join(", "),
  };
}

/** Messages of the issues at a JSON path or below it ("/scan/0" also takes "/scan/0/values/3"). */
export function issuesAt(issues: { path: string; message: string }[] | undefined, path: string): string | undefined {
  const hit = (issues ?? []).filter((i) => i.path === path || i.path.startsWith(path + "/"));
  return hit.length ? hit.map((i) => (i.path === path ? i.message : `${i.path.slice(path.length + 1)}: ${i.message}`)).join("; ") : undefined;
}

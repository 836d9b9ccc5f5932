"use client";
import { Field, inputClass } from "@/components/ui/field";
import { Button } from "@/components/ui/button";
import { issuesAt, type Draft, type ParamSchema, type SamplerOption, type ScanDraft } from "./spec-draft";

type Issues = { path: string; message: string }[];
const small = "rounded-md border border-line-strong bg-paper-raised px-2 py-1 text-sm";

function ParamInput({ name, p, value, onChange }: { name: string; p: ParamSchema; value: string; onChange: (v: string) => void }) {
  if (p.enum) {
    return (
      <select aria-label={name} value={value} onChange={(e) => onChange(e.target.value)} className={inputClass}>
        <option value="">(default{p.default !== undefined ? `: ${p.default}` : ""})</option>
        {p.enum.map((o) => <option key={String(o)} value={String(o)}>{String(o)}</option>)}
      </select>
    );
  }
  const numeric = p.type === "integer" || p.type === "number";
  return <input aria-label={name} value={value} onChange={(e) => onChange(e.target.value)} inputMode={numeric ? "decimal" : undefined}
    placeholder={p.default !== undefined ? `default ${p.default}` : numeric ? range(p) : ""} className={`${inputClass} num`} />;
}

const range = (p: ParamSchema) => {
  const lo = p.minimum ?? (p.exclusiveMinimum !== undefined ? `>${p.exclusiveMinimum}` : undefined);
  return lo !== undefined || p.maximum !== undefined ? `${lo ?? ""} … ${p.maximum ?? ""}` : "";
};

/** The sampler's parameters: each one either fixed (an input) or scanned (a row below). */
export function SamplerFields({ draft, sampler, issues, update }: { draft: Draft; sampler: SamplerOption | undefined; issues: Issues; update: (d: Partial<Draft>) => void }) {
  const required = new Set(sampler?.paramsSchema.required ?? []);
  // required parameters first, each group in the schema's order
  const props = Object.entries(sampler?.paramsSchema.properties ?? {}).sort(([a], [b]) => Number(required.has(b)) - Number(required.has(a)));
  const scanned = new Set(draft.scan.map((a) => a.param));
  const setScan = (i: number, change: Partial<ScanDraft>) => update({ scan: draft.scan.map((a, k) => (k === i ? { ...a, ...change } : a)) });
  const free = props.map(([k]) => k).filter((k) => !scanned.has(k));
  return (
    <>
      <fieldset className="space-y-3">
        <legend className="text-xs font-medium uppercase tracking-wide text-ink-soft mb-2">Fixed parameters</legend>
        <div className="grid gap-3 sm:grid-cols-3">
          {props.filter(([k]) => !scanned.has(k)).map(([k, p]) => (
            <Field key={k} label={`${k}${required.has(k) ? " *" : ""}`} hint={p.description} error={issuesAt(issues, `/fixed/${k}`)}>
              <ParamInput name={k} p={p} value={draft.fixed[k] ?? ""} onChange={(v) => update({ fixed: { ...draft.fixed, [k]: v } })} />
            </Field>
          ))}
        </div>
        {issuesAt(issues, "/fixed") && !props.some(([k]) => issuesAt(issues, `/fixed/${k}`)) ? <p role="alert" className="text-xs text-danger">{issuesAt(issues, "/fixed")}</p> : null}
      </fieldset>
      <fieldset className="space-y-2">
        <legend className="text-xs font-medium uppercase tracking-wide text-ink-soft mb-2">Scan <span className="normal-case tracking-normal text-ink-faint">— the points are the cartesian product of the rows; no row means one point</span></legend>
        {draft.scan.map((a, i) => {
          const err = issuesAt(issues, `/scan/${i}`);
          return (
            <div key={i} className="rounded-md border border-line p-2" data-testid={`scan-row-${i}`}>
              <div className="flex flex-wrap items-center gap-2 text-sm">
                <select aria-label={`scan ${i + 1} parameter`} value={a.param} onChange={(e) => setScan(i, { param: e.target.value })} className={small}>
                  {[a.param, ...free].filter((v, k, all) => all.indexOf(v) === k).map((k) => <option key={k} value={k}>{k}</option>)}
                </select>
                <select aria-label={`scan ${i + 1} kind`} value={a.kind} onChange={(e) => setScan(i, { kind: e.target.value as ScanDraft["kind"] })} className={small}>
                  <option value="linear">linear</option><option value="log">logarithmic</option><option value="values">values</option>
                </select>
                {a.kind === "values" ? (
                  <input aria-label={`scan ${i + 1} values`} value={a.values} onChange={(e) => setScan(i, { values: e.target.value })} placeholder="2.1, 2.2, 2.3" className={`${small} flex-1 min-w-48 num`} />
                ) : (
                  <>
                    <label className="flex items-center gap-1">from <input aria-label={`scan ${i + 1} from`} value={a.from} onChange={(e) => setScan(i, { from: e.target.value })} className={`${small} w-20 num`} /></label>
                    <label className="flex items-center gap-1">to <input aria-label={`scan ${i + 1} to`} value={a.to} onChange={(e) => setScan(i, { to: e.target.value })} className={`${small} w-20 num`} /></label>
                    <label className="flex items-center gap-1">points <input aria-label={`scan ${i + 1} points`} value={a.points} onChange={(e) => setScan(i, { points: e.target.value })} className={`${small} w-16 num`} /></label>
                  </>
                )}
                <button type="button" className="ml-auto text-xs text-danger hover:underline" onClick={() => update({ scan: draft.scan.filter((_, k) => k !== i) })}>remove</button>
              </div>
              {err ? <p role="alert" className="text-xs text-danger mt-1">{err}</p> : null}
            </div>
          );
        })}
        {free.length ? (
          <Button type="button" variant="quiet" onClick={() => update({ scan: [...draft.scan, { param: free.find((k) => !required.has(k) || ["T", "beta", "omega", "a"].includes(k)) ?? free[0], kind: "linear", from: "", to: "", points: "3", values: "" }] })}>
            + Scan a parameter
          </Button>
        ) : null}
        {issuesAt(issues, "/scan") && !draft.scan.some((_, i) => issuesAt(issues, `/scan/${i}`)) ? <p role="alert" className="text-xs text-danger">{issuesAt(issues, "/scan")}</p> : null}
      </fieldset>
    </>
  );
}

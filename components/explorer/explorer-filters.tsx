"use client";
import { useEffect, useState } from "react";
import type { ParamRange } from "@/lib/hooks/use-explorer-url";
import { choicesFor, effectiveSampler, selectClass, type ExplorerOptions } from "./explorer-options";

type Props = {
  get: (k: string) => string; set: (c: Record<string, string | null>) => void;
  ranges: ParamRange[]; setRanges: (r: ParamRange[]) => void; options: ExplorerOptions; busy: boolean;
};

/** Sampler, ensemble, tag, owner, observable and scope filters, and ranges of any parameter; all written to the URL. */
export function ExplorerFilters({ get, set, ranges, setRanges, options, busy }: Props) {
  const sampler = get("sampler");
  const { observables, params } = choicesFor(options, effectiveSampler(options, sampler, get("ensemble")));
  const [tag, setTag] = useState(get("tag"));
  useEffect(() => setTag(get("tag")), [get]);
  useEffect(() => {
    if (tag === get("tag")) return;
    const t = setTimeout(() => set({ tag: tag.trim() || null }), 400);
    return () => clearTimeout(t);
  }, [tag, get, set]);
  const ensembles = sampler ? options.ensembles.filter((e) => e.sampler === sampler) : options.ensembles;
  const label = "flex flex-col gap-0.5 text-xs text-ink-soft";
  return (
    <div className="space-y-2 mb-3" role="search" aria-label="Filter estimates">
      <div className="flex flex-wrap items-end gap-3 text-sm">
        <label className={label}>Sampler
          <select aria-label="Sampler" value={sampler} onChange={(e) => set({ sampler: e.target.value || null })} className={selectClass}>
            <option value="">any</option>
            {options.samplers.map((s) => <option key={s.name} value={s.name}>{s.name}</option>)}
          </select>
        </label>
        <label className={label}>Ensemble
          <select aria-label="Ensemble" value={get("ensemble")} onChange={(e) => set({ ensemble: e.target.value || null })} className={`${selectClass} max-w-64`}>
            <option value="">any</option>
            {ensembles.map((e) => <option key={e.id} value={e.id}>{e.name}</option>)}
            {/* an ensemble from a link that is not offered (older, or not visible) still shows as the active filter, never as "any" */}
            {get("ensemble") && !ensembles.some((e) => e.id === get("ensemble")) ? <option value={get("ensemble")}>ensemble {get("ensemble").slice(0, 8)}… (from the link)</option> : null}
          </select>
        </label>
        <label className={label}>Observable
          <select aria-label="Observable" value={get("observable")} onChange={(e) => set({ observable: e.target.value || null })} className={selectClass}>
            <option value="">any</option>
            {observables.map((o) => <option key={o} value={o}>{o}</option>)}
          </select>
        </label>
        <label className={label}>Owner
          <select aria-label="Owner" value={get("owner")} onChange={(e) => set({ owner: e.target.value || null })} className={selectClass}>
            <option value="">anyone</option>
            {options.owners.map((o) => <option key={o.id} value={o.id}>{o.name}</option>)}
          </select>
        </label>
        <label className={label}>Tag
          <input aria-label="Tag" value={tag} onChange={(e) => setTag(e.target.value)} placeholder="e.g. critical" className={`${selectClass} w-32`} />
        </label>
        <label className={label}>Estimates of
          <select aria-label="Scope" value={get("scope") || "point"} onChange={(e) => set({ scope: e.target.value === "point" ? null : e.target.value })} className={selectClass}>
            <option value="point">points (replicas combined)</option>
            <option value="run">single runs</option>
          </select>
        </label>
        <span className="text-xs text-ink-faint pb-1.5" aria-live="polite">{busy ? "updating…" : ""}</span>
      </div>
      <ParamRanges ranges={ranges} params={params} onChange={setRanges} />
    </div>
  );
}

/** Ranges [min, max] of any parameter; an empty end is open. Applied when a field is left. */
function ParamRanges({ ranges, params, onChange }: { ranges: ParamRange[]; params: string[]; onChange: (r: ParamRange[]) => void }) {
  const [draft, setDraft] = useState(ranges);
  useEffect(() => setDraft(ranges), [ranges]);
  const edit = (i: number, c: Partial<ParamRange>) => setDraft(draft.map((r, j) => (j === i ? { ...r, ...c } : r)));
  const apply = (list = draft) => onChange(list);
  return (
    <div className="flex flex-wrap items-center gap-2 text-sm" data-testid="param-ranges">
      {draft.map((r, i) => (
        <span key={i} className="inline-flex items-center gap-1 rounded-md border border-line px-2 py-1 bg-paper-raised">
          <input aria-label={`range ${i + 1} min`} value={r.min} onChange={(e) => edit(i, { min: e.target.value })} onBlur={() => apply()} onKeyDown={(e) => e.key === "Enter" && apply()} placeholder="min" className="w-16 num text-right bg-transparent" />
          <span className="text-ink-faint">≤</span>
          <select aria-label={`range ${i + 1} parameter`} value={r.name} onChange={(e) => { const next = draft.map((x, j) => (j === i ? { ...x, name: e.target.value } : x)); setDraft(next); apply(next); }} className="mono bg-transparent">
            {[...new Set([r.name, ...params])].map((p) => <option key={p} value={p}>{p}</option>)}
          </select>
          <span className="text-ink-faint">≤</span>
          <input aria-label={`range ${i + 1} max`} value={r.max} onChange={(e) => edit(i, { max: e.target.value })} onBlur={() => apply()} onKeyDown={(e) => e.key === "Enter" && apply()} placeholder="max" className="w-16 num bg-transparent" />
          <button type="button" aria-label={`remove range ${i + 1}`} className="text-ink-faint hover:text-danger ml-1" onClick={() => { const next = draft.filter((_, j) => j !== i); setDraft(next); apply(next); }}>×</button>
        </span>
      ))}
      {params.length ? (
        <button type="button" className="text-xs text-accent hover:underline" onClick={() => setDraft([...draft, { name: params.find((p) => !draft.some((d) => d.name === p)) ?? params[0], min: "", max: "" }])}>
          + Parameter range
        </button>
      ) : null}
    </div>
  );
}

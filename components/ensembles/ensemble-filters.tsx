"use client";
import { useEffect, useState } from "react";

/** The choices the server offers for the filters (only what the viewer may see). */
export type FilterOptions = { samplers: string[]; owners: { id: string; name: string }[] };

const ENSEMBLE_STATES = ["active", "done", "failed", "cancelled"];
const selectClass = "rounded-md border border-line-strong bg-paper-raised px-2 py-1 text-sm";

/** State, sampler, owner and tag filters; each change is written to the URL by the parent. */
export function EnsembleFilters({ values, options, onChange, busy }: {
  values: Record<string, string>; options: FilterOptions; onChange: (c: Record<string, string | null>) => void; busy: boolean;
}) {
  const [tag, setTag] = useState(values.tag);
  useEffect(() => setTag(values.tag), [values.tag]);
  // a typed tag is applied after a short pause, not on every keystroke
  useEffect(() => {
    if (tag === values.tag) return;
    const t = setTimeout(() => onChange({ tag: tag.trim() || null }), 400);
    return () => clearTimeout(t);
  }, [tag, values.tag, onChange]);
  return (
    <div className="flex flex-wrap items-end gap-3 mb-3 text-sm" role="search" aria-label="Filter ensembles">
      <label className="flex flex-col gap-0.5 text-xs text-ink-soft">State
        <select aria-label="State" value={values.state} onChange={(e) => onChange({ state: e.target.value || null })} className={selectClass}>
          <option value="">any</option>
          {ENSEMBLE_STATES.map((s) => <option key={s} value={s}>{s}</option>)}
        </select>
      </label>
      <label className="flex flex-col gap-0.5 text-xs text-ink-soft">Sampler
        <select aria-label="Sampler" value={values.sampler} onChange={(e) => onChange({ sampler: e.target.value || null })} className={selectClass}>
          <option value="">any</option>
          {options.samplers.map((s) => <option key={s} value={s}>{s}</option>)}
        </select>
      </label>
      <label className="flex flex-col gap-0.5 text-xs text-ink-soft">Owner
        <select aria-label="Owner" value={values.owner} onChange={(e) => onChange({ owner: e.target.value || null })} className={selectClass}>
          <option value="">anyone</option>
          {options.owners.map((o) => <option key={o.id} value={o.id}>{o.name}</option>)}
        </select>
      </label>
      <label className="flex flex-col gap-0.5 text-xs text-ink-soft">Tag
        <input aria-label="Tag" value={tag} onChange={(e) => setTag(e.target.value)} placeholder="e.g. critical" className={`${selectClass} w-36`} />
      </label>
      <span className="text-xs text-ink-faint pb-1.5" aria-live="polite">{busy ? "updating…" : ""}</span>
    </div>
  );
}

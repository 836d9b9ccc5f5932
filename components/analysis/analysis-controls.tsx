"use client";
import { inputClass } from "@/components/ui/field";

/** Observable, thermalisation cut (slider and number) and window rule of a re-analysis. */
export function AnalysisControls({ observables, observable, cut, maxCut, rule, onChange }: {
  observables: string[]; observable: string; cut: number; maxCut: number; rule: "wolff" | "madras-sokal";
  onChange: (c: { observable?: string; cut?: number; window?: "wolff" | "madras-sokal" }) => void;
}) {
  const select = `${inputClass} w-auto`;
  return (
    <div className="flex flex-wrap items-end gap-4 text-sm" role="group" aria-label="Analysis choices">
      <label className="flex flex-col gap-0.5 text-xs text-ink-soft">Observable
        <select aria-label="Observable" className={select} value={observable} onChange={(e) => onChange({ observable: e.target.value })}>
          {observables.map((o) => <option key={o} value={o}>{o}</option>)}
        </select>
      </label>
      <label className="flex flex-col gap-0.5 text-xs text-ink-soft min-w-64 flex-1">Thermalisation cut (measurements discarded)
        <input aria-label="Thermalisation cut slider" type="range" min={0} max={maxCut} step={1} value={cut} onChange={(e) => onChange({ cut: Number(e.target.value) })} className="accent-accent" />
      </label>
      <label className="flex flex-col gap-0.5 text-xs text-ink-soft">Cut
        <input aria-label="Thermalisation cut" type="number" min={0} max={maxCut} step={1} value={cut} className={`${inputClass} w-28 num`}
          onChange={(e) => { const v = Number(e.target.value); if (Number.isInteger(v) && v >= 0 && v <= maxCut) onChange({ cut: v }); }} />
      </label>
      <label className="flex flex-col gap-0.5 text-xs text-ink-soft">Window rule
        <select aria-label="Window rule" className={select} value={rule} onChange={(e) => onChange({ window: e.target.value as "wolff" | "madras-sokal" })}>
          <option value="wolff">Wolff (S = 1.5)</option>
          <option value="madras-sokal">Madras–Sokal (c = 6)</option>
        </select>
      </label>
    </div>
  );
}

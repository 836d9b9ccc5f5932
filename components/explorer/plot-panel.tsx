"use client";
import { useEffect, useState } from "react";
import { useExplorerPlot } from "@/lib/hooks/use-explorer";
import { Card } from "@/components/ui/card";
import { EstimatesPlot } from "./estimates-plot";
import { ExportLinks } from "./export-links";
import { selectClass } from "./explorer-options";

/** Plot controls (x, lines by, log axes, replicas), the plot and its export links. */
export function PlotPanel({ get, set, params, plotQuery }: { get: (k: string) => string; set: (c: Record<string, string | null>) => void; params: string[]; plotQuery: string }) {
  const observable = get("observable");
  const x = get("x") || params[0] || "";
  const groupBy = get("groupBy") || "ensemble";
  const query = `${plotQuery}${plotQuery ? "&" : ""}${new URLSearchParams({ x, groupBy })}`;
  const ready = Boolean(observable && x);
  const { data, error, isFetching } = useExplorerPlot(query, ready);
  const flag = (k: string) => get(k) === "1";
  const label = "flex flex-col gap-0.5 text-xs text-ink-soft";
  return (
    <Card title="Plot">
      <div className="flex flex-wrap items-end gap-3 text-sm mb-3" role="group" aria-label="Plot choices">
        <label className={label}>x axis
          <select aria-label="x axis" value={x} onChange={(e) => set({ x: e.target.value })} className={`${selectClass} mono`}>
            {params.map((p) => <option key={p} value={p}>{p}</option>)}
          </select>
        </label>
        <label className={label}>One line per
          <select aria-label="One line per" value={groupBy} onChange={(e) => set({ groupBy: e.target.value === "ensemble" ? null : e.target.value })} className={selectClass}>
            <option value="ensemble">ensemble</option>
            {params.filter((p) => p !== x).map((p) => <option key={p} value={`param:${p}`}>value of {p}</option>)}
          </select>
        </label>
        {[["logX", "log x"], ["logY", "log y"], ["replicas", "per-replica points"]].map(([k, text]) => (
          <FlagBox key={k} on={flag(k)} text={text} onChange={(on) => set({ [k]: on ? "1" : null })} />
        ))}
        <span className="text-xs text-ink-faint pb-1.5" aria-live="polite">{isFetching ? "plotting…" : ""}</span>
        {ready ? <span className="ml-auto"><ExportLinks base="/api/v1/plots/estimates" query={query} what="plot data" testId="plot-export" /></span> : null}
      </div>
      {!observable ? <p className="text-sm text-ink-soft py-8 text-center">Choose an <b>observable</b> above to plot it against a parameter: one quantity per plot, e.g. <span className="mono">e</span> against <span className="mono">T</span>.</p> : null}
      {error ? <p role="alert" className="text-sm text-danger">Could not plot: {error.message}</p> : null}
      {ready && data ? (data.series.length ? <EstimatesPlot data={data} observable={observable} x={x} logX={flag("logX")} logY={flag("logY")} replicas={flag("replicas")} />
        : <p className="text-sm text-ink-soft py-8 text-center">No estimate of <span className="mono">{observable}</span> with a numeric <span className="mono">{x}</span> matches these filters.</p>) : null}
    </Card>
  );
}

/** A checkbox kept in the URL; it flips at once, because the URL (router.replace) catches up only a moment later. */
function FlagBox({ on, text, onChange }: { on: boolean; text: string; onChange: (on: boolean) => void }) {
  const [checked, setChecked] = useState(on);
  useEffect(() => setChecked(on), [on]);
  return (
    <label className="flex items-center gap-1.5 pb-1.5">
      <input type="checkbox" checked={checked} onChange={(e) => { setChecked(e.target.checked); onChange(e.target.checked); }} /> {text}
    </label>
  );
}

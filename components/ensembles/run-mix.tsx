import { STATE_BG, STATE_SHAPE, STATE_TEXT } from "@/components/ui/state-badge";

const ORDER = ["done", "collecting", "running", "dispatched", "queued", "failed", "cancelled"];

/** An ensemble's runs as one stacked bar by state, with the counts in words beside it. */
export function RunMix({ counts, total }: { counts: Record<string, number>; total: number }) {
  const parts = ORDER.filter((s) => (counts[s] ?? 0) > 0);
  const words = parts.map((s) => `${counts[s]} ${s}`).join(", ");
  return (
    <div className="min-w-32" title={words}>
      <div className="flex h-1.5 rounded overflow-hidden bg-paper-sunken" aria-hidden>
        {parts.map((s) => <div key={s} className={STATE_BG[s]} style={{ width: `${(100 * counts[s]) / Math.max(1, total)}%` }} />)}
      </div>
      <div className="text-xxs text-ink-soft num mt-0.5">
        {total.toLocaleString("en-GB")} runs{parts.length ? " · " : ""}
        {parts.map((s, i) => <span key={s}>{i ? " " : ""}<span aria-hidden className={STATE_TEXT[s]}>{STATE_SHAPE[s]}</span> {counts[s]}</span>)}
      </div>
      <span className="sr-only">{words}</span>
    </div>
  );
}

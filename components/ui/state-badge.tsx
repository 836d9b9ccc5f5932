// Run states in the Okabe–Ito palette, always with the word and a shape (never colour alone).
export const STATE_SHAPE: Record<string, string> = { queued: "○", dispatched: "◔", running: "◑", collecting: "◕", done: "●", failed: "✕", cancelled: "⊘", active: "◐" };
export const STATE_TEXT: Record<string, string> = {
  queued: "text-state-queued", dispatched: "text-state-dispatched", running: "text-state-running", collecting: "text-state-collecting",
  done: "text-state-done", failed: "text-state-failed", cancelled: "text-state-cancelled",
  active: "text-accent", // an ensemble with runs still to finish
};

/** Background fills of the same palette, for grid cells and bars. */
export const STATE_BG: Record<string, string> = {
  queued: "bg-state-queued", dispatched: "bg-state-dispatched", running: "bg-state-running", collecting: "bg-state-collecting",
  done: "bg-state-done", failed: "bg-state-failed", cancelled: "bg-state-cancelled",
};

export function StateBadge({ state }: { state: string }) {
  return (
    <span className="inline-flex items-center gap-1 text-sm">
      <span aria-hidden className={STATE_TEXT[state] ?? ""}>{STATE_SHAPE[state] ?? "·"}</span>
      <span>{state}</span>
    </span>
  );
}

// Run states in the Okabe–Ito palette, always with the word and a shape (never colour alone).
const SHAPE: Record<string, string> = { queued: "○", dispatched: "◔", running: "◑", collecting: "◕", done: "●", failed: "✕", cancelled: "⊘" };
const COLOR: Record<string, string> = {
  queued: "text-state-queued", dispatched: "text-state-dispatched", running: "text-state-running", collecting: "text-state-collecting",
  done: "text-state-done", failed: "text-state-failed", cancelled: "text-state-cancelled",
};

export function StateBadge({ state }: { state: string }) {
  return (
    <span className="inline-flex items-center gap-1 text-sm">
      <span aria-hidden className={COLOR[state] ?? ""}>{SHAPE[state] ?? "·"}</span>
      <span>{state}</span>
    </span>
  );
}

/** A thin progress bar with its share in words for screen readers; `tone` picks a state colour. */
export function ProgressBar({ value, label, tone = "bg-accent", className = "" }: { value: number; label: string; tone?: string; className?: string }) {
  const pct = Math.max(0, Math.min(100, (Number.isFinite(value) ? value : 0) * 100));
  return (
    <div className={`h-1.5 rounded bg-paper-sunken overflow-hidden ${className}`} role="progressbar" aria-label={label}
      aria-valuenow={Math.round(pct)} aria-valuemin={0} aria-valuemax={100}>
      <div className={`h-full ${tone} transition-[width] duration-700`} style={{ width: `${pct}%` }} />
    </div>
  );
}

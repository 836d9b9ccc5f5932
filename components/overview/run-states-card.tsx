import { Card } from "@/components/ui/card";
import { StateBadge } from "@/components/ui/state-badge";

export function RunStatesCard({ counts }: { counts: Record<string, number> }) {
  const total = Object.values(counts).reduce((a, b) => a + b, 0);
  return (
    <Card title="Runs by state">
      <ul className="space-y-1.5" data-testid="run-states">
        {Object.entries(counts).map(([state, n]) => (
          <li key={state} className="flex items-center justify-between text-sm">
            <StateBadge state={state} />
            <span className="num font-medium" data-state={state}>{n.toLocaleString("en-GB")}</span>
          </li>
        ))}
      </ul>
      <p className="text-xs text-ink-soft mt-3 num">{total.toLocaleString("en-GB")} runs in all</p>
    </Card>
  );
}

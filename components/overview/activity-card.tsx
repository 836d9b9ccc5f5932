import { Card } from "@/components/ui/card";
import { Time } from "@/components/ui/time";

type Item = { at: string; kind: "run" | "audit"; text: string; detail: string };

export function ActivityCard({ items, className }: { items: Item[]; className?: string }) {
  return (
    <Card title="Recent activity" className={className}>
      {items.length === 0 ? <p className="text-sm text-ink-soft">Nothing has happened yet.</p> : (
        <ol className="divide-y divide-line" data-testid="activity">
          {items.map((i, k) => (
            <li key={k} className="py-1.5 flex gap-4 text-sm">
              <span className="w-40 shrink-0 text-ink-soft text-xs pt-0.5"><Time at={i.at} /></span>
              <span className="w-12 shrink-0 text-xxs uppercase tracking-wide text-ink-faint pt-1">{i.kind}</span>
              <span className="flex-1">{i.text}<span className="text-ink-faint"> · {i.detail}</span></span>
            </li>
          ))}
        </ol>
      )}
    </Card>
  );
}

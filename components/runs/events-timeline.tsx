import { StateBadge } from "@/components/ui/state-badge";
import { Time } from "@/components/ui/time";
import type { RunEventRow } from "@/lib/hooks/use-run";

const detailText = (d: Record<string, unknown>) => {
  const parts = Object.entries(d ?? {}).filter(([, v]) => v !== null && v !== undefined && v !== "").map(([k, v]) => `${k}: ${typeof v === "object" ? JSON.stringify(v) : String(v)}`);
  return parts.join(" · ");
};

/** Every state change of a run, oldest first: when (viewer's zone, UTC on hover), from → to, and why. */
export function EventsTimeline({ events }: { events: RunEventRow[] }) {
  if (events.length === 0) return <p className="text-sm text-ink-soft">No events yet.</p>;
  return (
    <ol className="relative border-l border-line ml-2 space-y-3" data-testid="events">
      {events.map((ev) => (
        <li key={ev.id} className="pl-4 relative">
          <span aria-hidden className="absolute -left-[5px] top-1.5 h-2.5 w-2.5 rounded-full bg-line-strong" />
          <div className="flex flex-wrap items-baseline gap-x-3 text-sm">
            <span className="text-xs text-ink-soft w-40"><Time at={ev.at} /></span>
            <span className="flex items-center gap-1">{ev.from ? <><StateBadge state={ev.from} /><span className="text-ink-faint">→</span></> : <span className="text-ink-faint text-xs">created →</span>}<StateBadge state={ev.to} /></span>
            <span className="mono text-xs text-ink-soft" data-testid="event-cause">{ev.cause}</span>
            {ev.actor ? <span className="text-xs text-ink-soft">by {ev.actor.name}</span> : null}
          </div>
          {detailText(ev.detail) ? <p className="text-xs text-ink-faint ml-43 mt-0.5 break-all">{detailText(ev.detail)}</p> : null}
        </li>
      ))}
    </ol>
  );
}

// The manuscript's history: who created, edited, froze, unfroze (and why) and verified it, oldest first.
import type { HistoryEntry } from "@/lib/manuscripts/manuscript-history";
import { Time } from "@/components/ui/time";

function what(h: HistoryEntry): React.ReactNode {
  const d = h.detail as Record<string, unknown>;
  switch (h.action) {
    case "manuscript.create": return "created the draft";
    case "manuscript.exhibit.add": return <>added exhibit <b>{String(d.label)}</b></>;
    case "manuscript.collaborator.add": return <>added <b>{String(d.userName ?? d.userId)}</b> as an editor</>;
    case "manuscript.freeze": return <>froze it ({Object.keys((d.snapshotHashes as object) ?? {}).length} exhibits, {String(d.items ?? "?")} items locked)</>;
    case "manuscript.unfreeze": return <>unfroze it: <q data-testid="unfreeze-reason">{String(d.reason)}</q></>;
    case "manuscript.verify": return "asked for a verification";
    case "manuscript.verified": return d.state === "verified" ? <span className="text-state-done">verification: ✓ verified</span> : <span className="text-danger">verification: ✗ {String(d.state)}</span>;
    default: return h.action;
  }
}

/** The history list. */
export function ManuscriptHistory({ entries }: { entries: HistoryEntry[] }) {
  if (entries.length === 0) return null;
  return (
    <ol className="space-y-1 text-sm" data-testid="history">
      {entries.map((h, i) => (
        <li key={i} className="grid grid-cols-[11rem_minmax(0,1fr)] gap-3" data-action={h.action}>
          <span className="text-ink-soft tabular-nums"><Time at={h.at} /></span>
          <span>{h.who ? <b className="font-medium">{h.who} </b> : null}{what(h)}</span>
        </li>
      ))}
    </ol>
  );
}

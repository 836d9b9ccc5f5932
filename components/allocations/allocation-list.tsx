import Link from "next/link";
import { coreHours } from "@/lib/format";
import type { AllocationListRow } from "@/lib/allocations/list-allocations";

const day = (d: string) => d.slice(0, 10);
const STATE_MARK: Record<string, string> = { active: "● active", suspended: "❚❚ suspended", closed: "■ closed" };

/** Every allocation the viewer may see, with its state and balance; each links to its usage page. */
export function AllocationList({ rows }: { rows: AllocationListRow[] }) {
  if (rows.length === 0) return <p className="text-sm text-ink-soft">No allocation yet. A coordinator grants core-hours to a group for a period with the form below.</p>;
  return (
    <table className="data" data-testid="allocation-list">
      <thead><tr><th>Allocation</th><th>State</th><th>Period</th><th className="n">Given</th><th className="n">Charged</th><th className="n">Held</th><th className="n">Free</th><th>Charged of given</th></tr></thead>
      <tbody>
        {rows.map((a) => {
          const share = a.given > 0 ? a.charged / a.given : 0;
          return (
            <tr key={a.id}>
              <td><Link href={`/allocations/${a.id}`} className="font-medium text-accent-strong hover:underline">{a.name}</Link><div className="text-xs text-ink-soft">{a.group}{a.cluster ? ` · ${a.cluster}` : ""}</div></td>
              <td className={a.state === "active" ? "" : "text-danger font-medium"}>{STATE_MARK[a.state]}</td>
              <td className="text-xs num whitespace-nowrap">{day(a.periodStart)} → {day(a.periodEnd)}</td>
              <td className="n">{coreHours(a.given)}</td>
              <td className="n">{coreHours(a.charged)}</td>
              <td className="n">{coreHours(a.held)}</td>
              <td className="n font-medium">{coreHours(a.available)}</td>
              <td className="w-32">
                <div className="h-2 rounded bg-paper-sunken overflow-hidden" role="meter" aria-valuenow={Math.round(share * 100)} aria-valuemin={0} aria-valuemax={100} aria-label="share charged">
                  <div className="h-full bg-accent" style={{ width: `${Math.min(100, share * 100)}%` }} />
                </div>
                <div className="text-xxs text-ink-soft num mt-0.5">{(share * 100).toFixed(1)} %</div>
              </td>
            </tr>
          );
        })}
      </tbody>
    </table>
  );
}

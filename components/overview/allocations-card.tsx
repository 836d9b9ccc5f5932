import { Card } from "@/components/ui/card";
import { coreHours } from "@/lib/format";

type A = { id: string; name: string; group: string; periodStart: Date | string; periodEnd: Date | string; granted: number; adjusted: number; charged: number; held: number; available: number };

const day = (d: Date | string) => new Date(d).toISOString().slice(0, 10);

export function AllocationsCard({ allocations, className }: { allocations: A[]; className?: string }) {
  return (
    <Card title="Allocations" className={className}>
      {allocations.length === 0 ? <p className="text-sm text-ink-soft">No allocation yet. A coordinator grants core-hours to a group on the Allocations page.</p> : (
        <table className="data" data-testid="allocations">
          <thead><tr><th>Allocation</th><th>Period</th><th className="n">Granted</th><th className="n">Charged</th><th className="n">Held</th><th className="n">Available</th><th>Use</th></tr></thead>
          <tbody>
            {allocations.map((a) => {
              const total = a.granted + a.adjusted;
              const used = total > 0 ? (a.charged + a.held) / total : 0;
              return (
                <tr key={a.id}>
                  <td><div className="font-medium">{a.name}</div><div className="text-xs text-ink-soft">{a.group}</div></td>
                  <td className="text-xs num whitespace-nowrap">{day(a.periodStart)} → {day(a.periodEnd)}</td>
                  <td className="n">{coreHours(total)}</td>
                  <td className="n">{coreHours(a.charged)}</td>
                  <td className="n">{coreHours(a.held)}</td>
                  <td className="n font-medium" data-testid="available">{coreHours(a.available)}</td>
                  <td className="w-28">
                    <div className="h-2 rounded bg-paper-sunken overflow-hidden" role="meter" aria-valuenow={Math.round(used * 100)} aria-valuemin={0} aria-valuemax={100} aria-label="share used or held">
                      <div className="h-full bg-accent" style={{ width: `${Math.min(100, used * 100)}%` }} />
                    </div>
                    <div className="text-xxs text-ink-soft num mt-0.5">{(used * 100).toFixed(1)} % used or held</div>
                  </td>
                </tr>
              );
            })}
          </tbody>
        </table>
      )}
      <p className="text-xxs text-ink-faint mt-2">core-hours; balances are sums of the allocation&apos;s ledger entries</p>
    </Card>
  );
}

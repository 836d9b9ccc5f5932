import "server-only";
import Link from "next/link";
import type { Identity } from "@/lib/auth/identity";
import { formatPlain } from "@/lib/format";
import { listPlannerRecord } from "@/lib/planner/list-record";
import { planIdsOf } from "@/lib/planner/plan-tag";

const sci = (x: number) => x.toExponential(2).replace("-", "−");

/** On an ensemble's page: the prediction it followed and, once it ended, achieved vs predicted per point. */
export async function PlanOutcomeCard({ who, ensembleId, tags }: { who: Identity; ensembleId: string; tags: string[] }) {
  if (!planIdsOf(tags).length) return null;
  const [outcome] = await listPlannerRecord(who, { ensembleId, limit: 1 });
  return (
    <section aria-label="Planner outcome" data-testid="plan-outcome" className="rounded-lg border border-line bg-paper-raised p-4 text-sm mt-6">
      <h2 className="text-xs font-medium uppercase tracking-wide text-ink-soft mb-2">Planner</h2>
      {!outcome ? (
        <p className="text-ink-soft">This ensemble follows a planner prediction; achieved and predicted errors are compared here when it ends.</p>
      ) : (
        <>
          <p>
            <span className="mono">{outcome.observable}</span>: achieved ÷ predicted error <span className="num font-medium">{formatPlain(outcome.statRatio, 3)}</span>
            {" "}(χ²-scaled point errors: {formatPlain(outcome.ratio, 3)}) over {outcome.pointsCompared} point{outcome.pointsCompared === 1 ? "" : "s"}; target {sci(outcome.targetError)}.
            {" "}<Link href="/planner" className="text-accent hover:underline">The planner&apos;s record →</Link>
          </p>
          <table className="w-full text-xs mt-2">
            <thead className="text-ink-faint"><tr><th className="text-left font-normal">point</th><th className="text-right font-normal">n kept</th><th className="text-right font-normal">predicted</th><th className="text-right font-normal">achieved</th><th className="text-right font-normal">factor</th></tr></thead>
            <tbody>
              {outcome.points.slice(0, 12).map((p, k) => (
                <tr key={k}>
                  <td className="mono">{Object.entries(p.params).map(([a, b]) => `${a}=${b}`).join(" ")}</td>
                  <td className="num text-right">{p.n.toLocaleString("en-GB")}</td>
                  <td className="num text-right">{sci(p.predictedError)}</td>
                  <td className="num text-right">{sci(p.achievedStatError)}</td>
                  <td className="num text-right">{formatPlain(p.statRatio, 3)}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </>
      )}
    </section>
  );
}

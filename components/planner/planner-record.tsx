import Link from "next/link";
import { coreHoursFine as coreHours } from "@/components/ensembles/core-hours";
import { formatPlain, utc } from "@/lib/format";
import type { Outcome } from "@/lib/planner/list-record";

const sci = (x: number) => x.toExponential(2).replace("-", "−");

/** The planner's record: one row per ended ensemble that followed a prediction, achieved ÷ predicted. */
export function PlannerRecord({ rows }: { rows: Outcome[] }) {
  if (!rows.length) {
    return (
      <div className="rounded-lg border border-dashed border-line-strong p-6 text-sm text-ink-soft" data-testid="planner-record-empty">
        <p className="font-medium text-ink">No planned ensemble has ended yet.</p>
        <p className="mt-1">In the submit form, give the planner an observable and a target error, press <em>Predict</em>, then <em>Use</em>:
          the spec gets a <span className="mono">plan:…</span> tag, and when the ensemble ends its achieved errors are compared here with the prediction.</p>
      </div>
    );
  }
  const geo = Math.exp(rows.reduce((a, r) => a + Math.log(r.statRatio), 0) / rows.length);
  return (
    <>
      <p className="text-sm mb-3" data-testid="planner-record-summary">
        Over {rows.length} ensemble{rows.length === 1 ? "" : "s"}, achieved ÷ predicted error averages <span className="num font-medium">{formatPlain(geo, 3)}</span> (geometric mean, unscaled errors).
        1 is a perfect prediction; the factor's own spread is a few per cent to tens of per cent, from the pilots' and the ensemble's error-of-error.
      </p>
      <table className="w-full text-sm" data-testid="planner-record">
        <thead className="text-xs text-ink-soft border-b border-line">
          <tr>
            <th className="text-left font-medium py-1.5">Ensemble</th><th className="text-left font-medium">Observable</th>
            <th className="text-right font-medium">Target</th><th className="text-right font-medium">Predicted</th><th className="text-right font-medium">Achieved</th>
            <th className="text-right font-medium" title="achieved ÷ predicted, unscaled combination of the replicas (χ²-scaled in brackets)">Factor</th>
            <th className="text-right font-medium">Points</th><th className="text-right font-medium">Core-h predicted / charged</th><th className="text-right font-medium">Recorded</th>
          </tr>
        </thead>
        <tbody>
          {rows.map((r) => (
            <tr key={r.id} className="border-b border-line">
              <td className="py-1.5"><Link href={`/ensembles/${r.ensembleId}`} className="text-accent hover:underline">{r.ensembleName}</Link></td>
              <td className="mono">{r.observable}</td>
              <td className="num text-right">{sci(r.targetError)}</td>
              <td className="num text-right">{sci(r.predictedError)}</td>
              <td className="num text-right">{sci(r.achievedError)}</td>
              <td className="num text-right font-medium">{formatPlain(r.statRatio, 3)} <span className="text-ink-faint font-normal">({formatPlain(r.ratio, 3)})</span></td>
              <td className="num text-right">{r.pointsCompared}</td>
              <td className="num text-right">{r.predictedCoreHours === null ? "–" : coreHours(r.predictedCoreHours)} / {r.chargedCoreHours === null ? "–" : coreHours(r.chargedCoreHours)}</td>
              <td className="num text-right" title={utc(r.recordedAt)}>{new Date(r.recordedAt).toLocaleDateString("en-GB")}</td>
            </tr>
          ))}
        </tbody>
      </table>
      <p className="text-xs text-ink-faint mt-2">Predicted: sqrt(2·τ<sub>int</sub>·variance / n) with the prediction&apos;s τ<sub>int</sub> and variance and the measurements the replicas kept; the worst point is shown. See docs/planner.md.</p>
    </>
  );
}

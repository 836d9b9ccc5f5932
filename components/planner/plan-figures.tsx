"use client";
import { coreHoursFine as coreHours } from "@/components/ensembles/core-hours";
import { formatPlain } from "@/lib/format";
import type { Prediction } from "@/lib/planner/predict";
import type { Derivation } from "@/lib/planner/types";

const count = (x: number) => x.toLocaleString("en-GB");
const seconds = (s: number) => (s < 120 ? `${formatPlain(s, 3)} s` : s < 7200 ? `${formatPlain(s / 60, 3)} min` : `${formatPlain(s / 3600, 3)} h`);

function derivation(d: Derivation): string {
  if (d.kind === "measured") return "measured";
  if (d.kind === "interpolated") return `interpolated in ${d.param} between ${d.from[0]} and ${d.from[1]}`;
  return `extrapolated from ${d.param}=${d.nearest}`;
}

/** A prediction's figures beside the form's reservation, then what they rest on. */
export function PlanFigures({ plan, reservation }: { plan: Prediction; reservation: number | null }) {
  const worst = plan.points.reduce((a, p) => (p.measurementsNeeded > a.measurementsNeeded ? p : a), plan.points[0]);
  return (
    <div className="space-y-3" data-testid="planner-result">
      <dl className="grid grid-cols-2 gap-y-1">
        <dt className="text-ink-soft">Measurements / replica</dt><dd className="num text-right font-medium" data-testid="planner-measurements">{count(plan.measurements)}</dd>
        <dt className="text-ink-soft">Sweeps / replica</dt><dd className="num text-right">{count(plan.sweepsPerReplica)}</dd>
        <dt className="text-ink-soft">Expected use</dt><dd className="num text-right font-medium" data-testid="planner-core-hours">{plan.coreHours === null ? "no timings" : `${coreHours(plan.coreHours)} core-h`}</dd>
        {plan.wallMinutes !== null ? <><dt className="text-ink-soft">Wall time / run</dt><dd className="num text-right">{count(plan.wallMinutes)} min</dd></> : null}
        {plan.reservationCoreHours !== null ? <><dt className="text-ink-soft">To reserve with it</dt><dd className="num text-right">{coreHours(plan.reservationCoreHours)} core-h</dd></> : null}
        {reservation !== null ? <><dt className="text-ink-soft">Form reserves now</dt><dd className="num text-right">{coreHours(reservation)} core-h</dd></> : null}
      </dl>
      <p className="text-xs text-ink-soft">
        Hardest point {Object.entries(worst.params).map(([k, v]) => `${k}=${v}`).join(", ")}: τ<sub>int</sub> {formatPlain(worst.tauInt, 3)}, variance {formatPlain(worst.variance, 3)},
        need {count(worst.measurementsNeeded)} ± {formatPlain(100 * worst.relUncertainty, 2)} % ({derivation(worst.derivation)}).
        {plan.cutAllowance > 0 ? ` +${count(plan.cutAllowance)} for the thermalisation cut.` : ""}
      </p>
      {plan.warnings.length ? (
        <ul className="text-xs space-y-1 text-ink" data-testid="planner-warnings">{plan.warnings.map((w, k) => <li key={k}>⚠ {w}</li>)}</ul>
      ) : null}
      <details className="text-xs text-ink-soft">
        <summary className="cursor-pointer">Inputs ({plan.inputs.length} estimates) and assumptions</summary>
        <table className="w-full mt-2">
          <thead><tr className="text-ink-faint"><th className="text-left font-normal">point</th><th className="text-right font-normal">τ<sub>int</sub></th><th className="text-right font-normal">var</th><th className="text-right font-normal">n</th><th className="text-right font-normal">s/sweep</th></tr></thead>
          <tbody>
            {plan.inputs.slice(0, 20).map((i) => (
              <tr key={i.estimateId} title={`estimate ${i.estimateId}, run ${i.runId}, ensemble ${i.ensembleId}`}>
                <td className="mono">{Object.values(i.params).join(" ")}</td>
                <td className="num text-right">{formatPlain(i.tauInt, 3)}</td><td className="num text-right">{formatPlain(i.variance, 3)}</td>
                <td className="num text-right">{count(i.n)}</td><td className="num text-right">{i.secondsPerSweep === null ? "–" : formatPlain(i.secondsPerSweep, 2)}</td>
              </tr>
            ))}
          </tbody>
        </table>
        {plan.inputs.length > 20 ? <p>… and {plan.inputs.length - 20} more.</p> : null}
        <ul className="mt-2 list-disc pl-4 space-y-1">{[...plan.conventions, ...plan.assumptions].map((a, k) => <li key={k}>{a}</li>)}</ul>
        <p className="mt-2">Expected run time {plan.points[0].secondsPerRun === null ? "unknown" : seconds(Math.max(...plan.points.map((p) => p.secondsPerRun ?? 0)))} at the slowest point. Prediction <span className="mono">{plan.tag}</span>.</p>
      </details>
    </div>
  );
}

import { concise, formatPlain } from "@/lib/format";
import type { RunEstimate } from "@/lib/hooks/use-run";

const tau = (e: RunEstimate) => (e.tauInt === null ? "—" : e.tauIntError ? concise(e.tauInt, e.tauIntError) : formatPlain(e.tauInt, 4));

/** A run's estimates in concise notation (full values on hover), τ_int beside every error. */
export function EstimatesTable({ estimates, state }: { estimates: RunEstimate[]; state: string }) {
  if (estimates.length === 0) {
    const why = state === "failed" || state === "cancelled" ? `This run ended ${state} before its series was imported, so there is nothing to estimate. Resubmit it from its ensemble.`
      : "No estimates yet: they are computed when the run's series has been imported.";
    return <p className="text-sm text-ink-soft">{why}</p>;
  }
  return (
    <table className="data" data-testid="estimates">
      <thead><tr><th>Observable</th><th className="n">Estimate</th><th className="n">τ<sub>int</sub></th><th className="n">N</th><th className="n">Therm. cut</th><th className="n">Window</th><th>Method</th></tr></thead>
      <tbody>
        {estimates.map((e) => (
          <tr key={e.observable} data-observable={e.observable}>
            <td className="mono">{e.observable}</td>
            <td className="n font-medium" title={`mean ${e.mean} ± ${e.error}`} data-testid="estimate">{concise(e.mean, e.error)}</td>
            <td className="n" title={e.tauInt === null ? "" : `tau_int ${e.tauInt} ± ${e.tauIntError ?? "?"} measurements`} data-testid="tau">{tau(e)}</td>
            <td className="n">{e.n.toLocaleString("en-GB")}</td>
            <td className="n">{e.thermCut.toLocaleString("en-GB")}</td>
            <td className="n">{e.window ?? "—"}</td>
            <td className="text-xs text-ink-soft">{e.method} <span className="text-ink-faint">v{e.analysisVersion}</span></td>
          </tr>
        ))}
      </tbody>
    </table>
  );
}

import { concise, formatPlain } from "@/lib/format";
import type { EstimateVersion } from "@/lib/hooks/use-run-analysis";
import { Time } from "@/components/ui/time";

const tau = (v: EstimateVersion) => (v.tauInt === null ? "—" : v.tauIntError ? concise(v.tauInt, v.tauIntError) : formatPlain(v.tauInt, 4));

/** Every stored estimate version of one observable, newest first: old ones are kept, with who chose them and when. */
export function EstimateVersions({ versions, people }: { versions: EstimateVersion[]; people: Record<string, string> }) {
  if (versions.length === 0) return <p className="text-sm text-ink-soft">No stored estimate for this observable yet.</p>;
  const sorted = [...versions].sort((a, b) => b.version - a.version);
  return (
    <table className="data" data-testid="versions">
      <thead><tr><th className="n">Version</th><th className="n">Estimate</th><th className="n"><span className="normal-case">τ<sub>int</sub></span></th><th className="n">Cut</th><th className="n">Window</th><th>Method</th><th>Chosen by</th><th>When</th></tr></thead>
      <tbody>
        {sorted.map((v) => (
          <tr key={v.id} data-version={v.version} data-current={v.isCurrent ? "yes" : "no"}>
            <td className="n num">v{v.version}{v.isCurrent ? <span className="ml-1 rounded bg-accent-soft px-1 text-xxs text-accent-strong">current</span> : null}</td>
            <td className="n" title={`mean ${v.mean} ± ${v.error}`}>{concise(v.mean, v.error)}</td>
            <td className="n">{tau(v)}</td>
            <td className="n">{v.thermCut.toLocaleString("en-GB")}</td>
            <td className="n">{v.window ?? "—"}</td>
            <td className="text-xs text-ink-soft">{v.method} <span className="text-ink-faint">v{v.analysisVersion}</span></td>
            <td className="text-sm">{v.chosenById ? (people[v.chosenById] ?? <span className="mono text-xs">{v.chosenById.slice(0, 8)}</span>) : <span className="text-ink-faint">automatic (at import)</span>}</td>
            <td className="text-xs"><Time at={v.chosenAt ?? v.createdAt} /></td>
          </tr>
        ))}
      </tbody>
    </table>
  );
}

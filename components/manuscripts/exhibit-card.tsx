// One exhibit on its manuscript's page: label, caption, a preview (small plot or row count), what lies beneath it,
// the link that reopens its view in the explorer and, once frozen, the snapshotted numbers with their provenance.
import Link from "next/link";
import { concise } from "@/lib/format";
import type { ExhibitView } from "@/lib/manuscripts/list-manuscripts";
import { ExhibitPlot } from "./exhibit-plot";

const bytes = (n: number) => (n < 1024 ? `${n} B` : n < 1024 ** 2 ? `${(n / 1024).toFixed(1)} KiB` : `${(n / 1024 ** 2).toFixed(1)} MiB`);
const SHOWN = 12;

/** The exhibit's card; `verified` is its line of the latest verification report, if any. */
export function ExhibitCard({ x, verified }: { x: ExhibitView; verified?: "verified" | "differs" | null }) {
  const p = x.preview;
  const plot = x.kind === "figure" && p.x && p.series.length > 0;
  return (
    <section className="rounded-lg border border-line bg-paper-raised p-4" data-testid="exhibit" data-label={x.label} aria-label={`Exhibit ${x.label}`}>
      <header className="flex flex-wrap items-baseline gap-x-3 gap-y-1">
        <h2 className="font-medium">{x.label}</h2>
        <span className="text-xs uppercase tracking-wide text-ink-faint">{x.kind}</span>
        {verified === "verified" ? <span className="text-xs font-medium text-state-done" data-testid="exhibit-verified">✓ verified</span> : null}
        {verified === "differs" ? <span className="text-xs font-medium text-danger">✗ differs</span> : null}
        <Link className="ml-auto text-sm text-accent hover:underline" href={p.explorerHref} data-testid="open-in-explorer">Open in explorer →</Link>
      </header>
      {x.caption ? <p className="mt-1 text-sm text-ink-soft">{x.caption}</p> : null}
      <div className={`mt-3 grid gap-4 ${plot ? "md:grid-cols-[minmax(0,1fr)_16rem]" : ""}`}>
        {plot ? <ExhibitPlot series={p.series} x={p.x!} y={p.observables.join(", ")} label={x.label} /> : null}
        <dl className="grid grid-cols-[auto_1fr] content-start gap-x-3 gap-y-1 text-sm tabular-nums" data-testid="exhibit-counts">
          <dt className="text-ink-soft">{p.from === "snapshot" ? "Estimates frozen" : "Estimates now"}</dt><dd data-testid="count-estimates">{p.estimates.toLocaleString("en-GB")}</dd>
          <dt className="text-ink-soft">Runs beneath</dt><dd data-testid="count-runs">{p.from === "snapshot" || p.runs ? p.runs.toLocaleString("en-GB") : "counted at freeze"}</dd>
          <dt className="text-ink-soft">Archived files</dt><dd data-testid="count-files">{p.files === null ? "counted at freeze" : `${p.files.toLocaleString("en-GB")} (${bytes(p.bytes ?? 0)})`}</dd>
          <dt className="text-ink-soft">Observables</dt><dd className="mono">{p.observables.join(", ") || "—"}</dd>
          {p.pointsLeftOut ? <><dt className="text-ink-soft">Not drawn</dt><dd>{p.pointsLeftOut} (no numeric {p.x ?? "x"}, or beyond the preview)</dd></> : null}
        </dl>
      </div>
      {p.estimates === 0 && p.from === "current" ? <p className="mt-2 text-sm text-danger">This view selects no estimates of the group; freezing will refuse it. Open it in the explorer and widen its filters.</p> : null}
      {x.snapshotHash ? <p className="mt-3 text-xs text-ink-soft">snapshot sha256 <span className="mono break-all" data-testid="snapshot-hash">{x.snapshotHash}</span></p> : null}
      {x.snapshot ? (
        <details className="mt-2 text-sm">
          <summary className="cursor-pointer text-accent">Frozen values ({x.snapshot.estimates.length})</summary>
          <table className="data mt-2 w-full">
            <thead><tr><th>Observable</th><th>Parameters</th><th className="n">Value</th><th className="n normal-case">τ_int</th><th>Analysis</th><th>Provenance</th></tr></thead>
            <tbody>{x.snapshot.estimates.slice(0, SHOWN).map((e) => (
              <tr key={e.id}>
                <td className="mono">{e.observable}</td><td className="mono text-xs">{Object.entries(e.params).map(([k, v]) => `${k}=${v}`).join(" ")}</td>
                <td className="n" title={`${e.mean} ± ${e.error}`}>{concise(e.mean, e.error)}</td><td className="n">{e.tauInt === null ? "—" : e.tauInt.toFixed(2)}</td>
                <td className="text-xs">{e.method} v{e.analysisVersion} · cut {e.thermCut}</td>
                <td><Link className="text-accent hover:underline" href={`/provenance/estimates/${e.id}`}>trace</Link></td>
              </tr>))}</tbody>
          </table>
          {x.snapshot.estimates.length > SHOWN ? <p className="mt-1 text-xs text-ink-soft">{x.snapshot.estimates.length - SHOWN} more in the bundle&apos;s CSV.</p> : null}
        </details>
      ) : null}
    </section>
  );
}

import Link from "next/link";
import { notFound } from "next/navigation";
import { pageIdentity } from "@/lib/auth/page-identity";
import { checkScope } from "@/lib/auth/scope";
import { AppError } from "@/lib/errors";
import { concise } from "@/lib/format";
import { manuscriptTarget } from "@/lib/manuscripts/access";
import { manuscriptDetail } from "@/lib/manuscripts/list-manuscripts";
import { PageHeader } from "@/components/ui/page-header";
import { ManuscriptControls } from "@/components/manuscripts/manuscript-controls";

export const metadata = { title: "Manuscript" };
export const dynamic = "force-dynamic";

export default async function ManuscriptPage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  const who = await pageIdentity();
  const target = await manuscriptTarget(id);
  if (!target) notFound();
  try { checkScope(who, target, "read"); } catch (err) { if (err instanceof AppError) notFound(); throw err; }
  const ms = await manuscriptDetail(who, id);
  return (
    <>
      <PageHeader title={ms.title} purpose={`${ms.state === "frozen" ? "❄ Frozen" : "✎ Draft"}${ms.journal ? ` · for ${ms.journal}` : ""} · the exhibits of this paper and the exact numbers behind them.`} />
      <div className="mb-6"><ManuscriptControls id={ms.id} may={ms.may} latest={ms.latestVerification as never} /></div>
      {ms.exhibits.length === 0 ? <p className="text-sm text-ink-soft">No exhibits yet. Add a figure or table with the saved explorer view behind it.</p> : null}
      {ms.exhibits.map((x) => (
        <section key={x.id} className="mb-6 rounded-lg border border-line bg-paper-raised p-4">
          <h2 className="font-medium">{x.label} <span className="text-ink-soft text-sm">({x.kind})</span></h2>
          {x.caption ? <p className="text-sm text-ink-soft">{x.caption}</p> : null}
          {x.snapshotHash ? <p className="text-xs font-mono text-ink-soft">snapshot sha256 {x.snapshotHash}</p> : <p className="text-xs text-ink-soft">query: <span className="font-mono">{JSON.stringify(x.query)}</span></p>}
          {x.snapshot ? (
            <table className="mt-2 w-full text-sm tabular-nums">
              <thead className="text-left text-ink-soft"><tr><th>Observable</th><th>Parameters</th><th>Value</th><th>τ_int</th><th>Analysis</th><th>Provenance</th></tr></thead>
              <tbody>{x.snapshot.estimates.map((e) => (
                <tr key={e.id} className="border-t border-line">
                  <td>{e.observable}</td><td className="font-mono text-xs">{Object.entries(e.params).map(([k, v]) => `${k}=${v}`).join(" ")}</td>
                  <td title={`${e.mean} ± ${e.error}`}>{concise(e.mean, e.error)}</td><td>{e.tauInt === null ? "—" : e.tauInt.toFixed(2)}</td>
                  <td className="text-xs">{e.analysisVersion} · cut {e.thermCut}</td>
                  <td><Link className="text-accent hover:underline" href={`/provenance/estimates/${e.id}`}>trace</Link></td>
                </tr>))}</tbody>
            </table>
          ) : null}
        </section>
      ))}
    </>
  );
}

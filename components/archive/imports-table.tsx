// The imports list: who, when, original names, state, reason, and the run it became.
import Link from "next/link";
import { Time } from "@/components/ui/time";
import type { ImportRow } from "@/lib/uploads/list-imports";

/** Server-rendered table of imports, newest first. */
export function ImportsTable({ rows, total }: { rows: ImportRow[]; total: number }) {
  if (rows.length === 0) {
    return <p className="text-sm text-ink-soft">No imports yet. Results of runs on Ergodex's clusters appear here when collected; upload bundles of runs done elsewhere above, or with <code className="font-mono">ergodex deposit ./bundle-folder</code>.</p>;
  }
  return (
    <div className="overflow-x-auto">
      <p className="text-xs text-ink-soft mb-2 tabular-nums">Newest {rows.length} of {total.toLocaleString()} imports</p>
      <table className="w-full text-sm">
        <thead><tr className="text-left text-ink-soft border-b border-line">
          <th className="py-1.5 pr-3 font-medium">When</th><th className="pr-3 font-medium">From</th><th className="pr-3 font-medium">Who</th>
          <th className="pr-3 font-medium">Files</th><th className="pr-3 font-medium">State</th><th className="pr-3 font-medium">Run</th>
        </tr></thead>
        <tbody>
          {rows.map((r) => (
            <tr key={r.id} className="border-b border-line align-top">
              <td className="py-1.5 pr-3 whitespace-nowrap"><Time at={r.createdAt} /></td>
              <td className="pr-3">{r.source === "upload" ? "upload" : "cluster"}</td>
              <td className="pr-3">{r.uploadedBy?.name ?? "—"}</td>
              <td className="pr-3 font-mono text-xs" title={r.originalNames.join("\n")}>
                {r.originalNames.slice(0, 3).join(", ")}{r.originalNames.length > 3 ? ` +${r.originalNames.length - 3}` : ""}
                <div className="text-ink-soft" title={r.bundleHash}>sha256 {r.bundleHash.slice(0, 12)}…</div>
              </td>
              <td className="pr-3">
                {r.state === "accepted" ? "✓ accepted" : "✗ rejected"}
                {r.rejectReason ? <p className="font-mono text-xs whitespace-pre-wrap break-words max-w-md">{r.rejectReason}</p> : null}
              </td>
              <td className="pr-3">{r.run ? <Link className="underline font-mono text-xs" href={`/runs/${r.run.id}`}>{r.run.id.slice(0, 8)}</Link> : "—"}
                {r.run ? <div className="text-xs text-ink-soft"><Link className="underline" href={`/ensembles/${r.run.ensembleId}`}>{r.run.ensembleName}</Link></div> : null}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}

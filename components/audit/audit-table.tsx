// The audit table: newest first, paged on the server through the URL; targets link to their pages where they have one.
import Link from "next/link";
import type { AuditRow } from "@/lib/audit/list-audit";
import { Time } from "@/components/ui/time";

const PAGES: Record<string, (id: string) => string> = {
  run: (id) => `/provenance/runs/${id}`, ensemble: (id) => `/ensembles/${id}`, manuscript: (id) => `/manuscripts/${id}`, estimate: (id) => `/provenance/estimates/${id}`,
};

function detailText(d: Record<string, unknown>): string {
  const s = JSON.stringify(d);
  return s === "{}" ? "" : s;
}

/** Rows with previous/next links that keep the filter. */
export function AuditTable({ rows, total, page, pageSize, query }: { rows: AuditRow[]; total: number; page: number; pageSize: number; query: Record<string, string> }) {
  const pages = Math.max(1, Math.ceil(total / pageSize));
  const at = (p: number) => `/audit?${new URLSearchParams({ ...query, page: String(p) })}`;
  if (rows.length === 0) return <p className="text-sm text-ink-soft" data-testid="audit-empty">No audit entries match. Every change made through Ergodex is recorded here; widen the filter or clear it.</p>;
  return (
    <div>
      <div className="overflow-x-auto rounded-lg border border-line">
        <table className="w-full text-sm" data-testid="audit-table">
          <thead className="bg-paper-sunken text-left text-xs text-ink-soft">
            <tr><th className="px-3 py-2">when</th><th className="px-3 py-2">who</th><th className="px-3 py-2">action</th><th className="px-3 py-2">target</th><th className="px-3 py-2">from where</th><th className="px-3 py-2">detail</th></tr>
          </thead>
          <tbody>
            {rows.map((r) => {
              const page = r.targetId && PAGES[r.targetType]?.(r.targetId);
              return (
                <tr key={r.id} className="border-t border-line align-top" data-testid="audit-row" data-action={r.action}>
                  <td className="px-3 py-1.5 whitespace-nowrap"><Time at={r.createdAt} /></td>
                  <td className="px-3 py-1.5">{r.actorName ?? <span className="text-ink-faint">system</span>}</td>
                  <td className="px-3 py-1.5 mono text-xs">{r.action}</td>
                  <td className="px-3 py-1.5 text-xs">{r.targetType}{r.targetId ? <> {page ? <Link href={page} className="mono text-accent hover:underline">{r.targetId.slice(0, 8)}</Link> : <span className="mono">{r.targetId.slice(0, 8)}</span>}</> : null}</td>
                  <td className="px-3 py-1.5 mono text-xs">{r.ip ?? "—"}{r.requestId ? <span className="block text-ink-faint" title="request id">{r.requestId.slice(0, 12)}</span> : null}</td>
                  <td className="px-3 py-1.5 mono text-xxs text-ink-soft max-w-xs truncate" title={detailText(r.detail)}>{detailText(r.detail)}</td>
                </tr>
              );
            })}
          </tbody>
        </table>
      </div>
      <nav aria-label="Pages" className="flex items-center justify-between pt-3 text-sm text-ink-soft">
        <span className="num" data-testid="audit-range">{((page - 1) * pageSize + 1).toLocaleString("en-GB")}–{Math.min(total, page * pageSize).toLocaleString("en-GB")} of {total.toLocaleString("en-GB")}</span>
        <span className="flex gap-3">
          {page > 1 ? <Link href={at(page - 1)} className="text-accent hover:underline">‹ newer</Link> : null}
          <span className="num">page {page} of {pages}</span>
          {page < pages ? <Link href={at(page + 1)} className="text-accent hover:underline">older ›</Link> : null}
        </span>
      </nav>
    </div>
  );
}

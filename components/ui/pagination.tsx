"use client";
import { Button } from "./button";

/** Page n of m with previous/next, for server-side paginated tables. */
export function Pagination({ page, pageSize, total, onPage, onPageSize }: {
  page: number; pageSize: number; total: number; onPage: (p: number) => void; onPageSize?: (n: number) => void;
}) {
  const pages = Math.max(1, Math.ceil(total / pageSize));
  const from = total === 0 ? 0 : (page - 1) * pageSize + 1;
  const to = Math.min(total, page * pageSize);
  return (
    <nav aria-label="Pages" className="flex items-center justify-between gap-3 pt-3 text-sm text-ink-soft">
      <span className="num" data-testid="page-range">{from.toLocaleString("en-GB")}–{to.toLocaleString("en-GB")} of {total.toLocaleString("en-GB")}</span>
      <span className="flex items-center gap-2">
        {onPageSize ? (
          <label className="flex items-center gap-1 text-xs">rows
            <select value={pageSize} onChange={(e) => onPageSize(Number(e.target.value))} className="rounded border border-line-strong bg-paper-raised px-1 py-0.5">
              {[10, 25, 50, 100].map((n) => <option key={n} value={n}>{n}</option>)}
            </select>
          </label>
        ) : null}
        <Button variant="quiet" disabled={page <= 1} onClick={() => onPage(page - 1)} aria-label="Previous page">‹</Button>
        <span className="num">page {page} of {pages}</span>
        <Button variant="quiet" disabled={page >= pages} onClick={() => onPage(page + 1)} aria-label="Next page">›</Button>
      </span>
    </nav>
  );
}

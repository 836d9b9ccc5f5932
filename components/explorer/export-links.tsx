/** CSV and JSON downloads of what is on screen; the server adds the header block (query, analysis versions, when, by whom). */
export function ExportLinks({ base, query, what, testId }: { base: string; query: string; what: string; testId: string }) {
  const href = (f: string) => `${base}?${query}${query ? "&" : ""}format=${f}`;
  const cls = "rounded-md border border-line-strong bg-paper-raised px-2.5 py-1 text-xs font-medium hover:bg-paper-sunken";
  return (
    <span className="inline-flex items-center gap-1.5 text-xs text-ink-soft" data-testid={testId}>
      Export {what}
      <a className={cls} href={href("csv")} download aria-label={`Export ${what} as CSV`}>CSV</a>
      <a className={cls} href={href("json")} download aria-label={`Export ${what} as JSON`}>JSON</a>
    </span>
  );
}

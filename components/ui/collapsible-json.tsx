/** A JSON document folded away until asked for (native details/summary: no script needed). */
export function CollapsibleJson({ summary, value, testId }: { summary: string; value: unknown; testId?: string }) {
  return (
    <details className="rounded-lg border border-line bg-paper-raised" data-testid={testId}>
      <summary className="cursor-pointer px-4 py-2 text-sm font-medium text-ink-soft hover:text-ink">{summary}</summary>
      <pre className="mono text-xs px-4 pb-4 overflow-x-auto">{JSON.stringify(value, null, 2)}</pre>
    </details>
  );
}

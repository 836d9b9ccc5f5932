// The audit filter as a plain GET form: the URL carries the filter, so a view can be bookmarked and shared.
import Link from "next/link";

const FIELDS: { key: string; label: string; placeholder: string; type?: string }[] = [
  { key: "actor", label: "who", placeholder: "name, e-mail or id" },
  { key: "action", label: "action", placeholder: "e.g. manuscript. or run.replay" },
  { key: "target", label: "target", placeholder: "type (run) or id" },
  { key: "from", label: "from", placeholder: "", type: "date" },
  { key: "to", label: "to", placeholder: "", type: "date" },
];

/** Filter fields (who, action prefix, target, date range). */
export function AuditFilterForm({ values }: { values: Record<string, string> }) {
  return (
    <form method="get" action="/audit" className="flex flex-wrap items-end gap-3 mb-4 text-sm" data-testid="audit-filter" role="search">
      {FIELDS.map((f) => (
        <label key={f.key} className="flex flex-col gap-0.5">
          <span className="text-xs text-ink-soft">{f.label}</span>
          <input name={f.key} type={f.type ?? "text"} defaultValue={values[f.key] ?? ""} placeholder={f.placeholder} aria-label={`filter by ${f.label}`}
            className="rounded-md border border-line-strong bg-paper-raised px-2 py-1 w-44" />
        </label>
      ))}
      <button type="submit" className="rounded-md bg-accent text-white px-3 py-1.5 font-medium hover:bg-accent-strong">Filter</button>
      <Link href="/audit" className="text-accent hover:underline py-1.5">clear</Link>
    </form>
  );
}

/** A labelled input with its field-level error below it. */
export function Field({ label, error, children, hint }: { label: string; error?: string; hint?: string; children: React.ReactNode }) {
  return (
    <label className="block text-sm">
      <span className="block font-medium text-ink-soft mb-1">{label}</span>
      {children}
      {hint && !error ? <span className="block text-xs text-ink-faint mt-1">{hint}</span> : null}
      {error ? <span role="alert" className="block text-xs text-danger mt-1">{error}</span> : null}
    </label>
  );
}

export const inputClass = "w-full rounded-md border border-line-strong bg-paper-raised px-2.5 py-1.5 text-sm focus:outline-2 focus:outline-accent";

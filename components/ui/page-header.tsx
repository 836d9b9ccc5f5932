/** Each page's title and the one line that says what it is for. */
export function PageHeader({ title, purpose, actions }: { title: string; purpose: string; actions?: React.ReactNode }) {
  return (
    <header className="flex items-end justify-between gap-4 border-b border-line pb-4 mb-6">
      <div>
        <h1 className="text-xl font-semibold tracking-tight">{title}</h1>
        <p className="text-sm text-ink-soft mt-1">{purpose}</p>
      </div>
      {actions ? <div className="flex gap-2">{actions}</div> : null}
    </header>
  );
}

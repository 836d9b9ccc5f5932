export function Card({ title, children, className = "" }: { title?: string; children: React.ReactNode; className?: string }) {
  return (
    <section className={`rounded-lg border border-line bg-paper-raised p-4 ${className}`}>
      {title ? <h2 className="text-xs font-medium uppercase tracking-wide text-ink-soft mb-3">{title}</h2> : null}
      {children}
    </section>
  );
}

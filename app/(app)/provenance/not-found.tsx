import Link from "next/link";

export default function ProvenanceNotFound() {
  return (
    <div role="alert" className="rounded-lg border border-line-strong bg-paper-raised p-5 max-w-xl" data-testid="not-found">
      <h1 className="font-semibold">Nothing to trace here</h1>
      <p className="text-sm mt-1 text-ink-soft">There is no run, ensemble or estimate with this id in your groups. Open one from the <Link href="/ensembles" className="text-accent hover:underline">Ensembles</Link> or <Link href="/explorer" className="text-accent hover:underline">Explorer</Link> page.</p>
    </div>
  );
}

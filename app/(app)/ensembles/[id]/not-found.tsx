import Link from "next/link";

export default function EnsembleNotFound() {
  return (
    <div role="alert" className="rounded-lg border border-line-strong bg-paper-raised p-5 max-w-xl" data-testid="not-found">
      <h1 className="font-semibold">Ensemble not found</h1>
      <p className="text-sm mt-1 text-ink-soft">There is no ensemble with this id in your groups. Check the link, or find it on the <Link href="/ensembles" className="text-accent hover:underline">Ensembles</Link> page.</p>
    </div>
  );
}

import Link from "next/link";

export default function RunNotFound() {
  return (
    <div role="alert" className="rounded-lg border border-line-strong bg-paper-raised p-5 max-w-xl" data-testid="not-found">
      <h1 className="font-semibold">Run not found</h1>
      <p className="text-sm mt-1 text-ink-soft">There is no run with this id in your groups. Open it from its ensemble on the <Link href="/ensembles" className="text-accent hover:underline">Ensembles</Link> page.</p>
    </div>
  );
}

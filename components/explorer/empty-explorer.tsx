import Link from "next/link";
import { Card } from "@/components/ui/card";

const EXAMPLE = "/explorer?sampler=ising2d&observable=e&x=T";

/** What an empty archive shows: where estimates come from, and what a first look at them will be. */
export function EmptyExplorer() {
  return (
    <div className="space-y-4" data-testid="explorer-empty">
      <p className="text-sm">No estimate is visible to you yet. The explorer lists every estimate in your groups&apos; archive — each with its error in concise notation and its τ<sub>int</sub> — and plots any observable against any parameter.</p>
      <div className="grid gap-4 lg:grid-cols-3">
        <Card title="1 · Run an ensemble">
          <p className="text-sm">Submit a scan on the <Link className="text-accent hover:underline" href="/ensembles/new?example=1">Ensembles</Link> page. When its runs are collected, every observable is estimated (MSER-5 cut, Γ-method error) and appears here.</p>
        </Card>
        <Card title="2 · Or upload results">
          <p className="text-sm">Bring in bundles of runs done elsewhere on the <Link className="text-accent hover:underline" href="/archive">Archive</Link> page; they are validated and estimated the same way.</p>
        </Card>
        <Card title="3 · Then explore">
          <p className="text-sm">Filter by sampler, ensemble, tag or a parameter range; choose an observable to plot it, e.g. <Link className="mono text-accent hover:underline" href={EXAMPLE}>e against T</Link> for an Ising scan. Each run opens its own analysis, where the thermalisation cut can be moved.</p>
        </Card>
      </div>
    </div>
  );
}

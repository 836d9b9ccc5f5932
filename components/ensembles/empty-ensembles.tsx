import Link from "next/link";
import { Card } from "@/components/ui/card";
import { CopyButton } from "@/components/ui/copy-button";
import { EXAMPLE_SPEC_JSON } from "./example-spec";

const CURL = `curl -X POST "$ERGODEX_URL/api/v1/ensembles" \\
  -H "Authorization: Bearer $ERGODEX_TOKEN" \\
  -H "Content-Type: application/json" \\
  --data @spec.json`;
const CLI = `export ERGODEX_TOKEN=edx_…
ergodex send spec.json
ergodex look <ensemble id>
ergodex fetch-estimates <ensemble id> -o estimates.csv`;

/** What an empty Ensembles page shows: the three ways to submit, with an example spec to start from. */
export function EmptyEnsembles() {
  return (
    <div className="space-y-4" data-testid="ensembles-empty">
      <p className="text-sm">No ensemble yet. An ensemble is one sampler run at many parameter points, several replicas each. Submit your first one in any of three ways; all three check the spec the same way and reserve its core-hours on your group&apos;s allocation.</p>
      <div className="grid gap-4 lg:grid-cols-2">
        <Card title="1 · With the form" className="lg:col-span-2">
          <p className="text-sm">Pick a sampler, set its parameters and a scan, and see the points, seeds and core-hours before you submit.</p>
          <div className="mt-3 flex gap-3 text-sm">
            <Link href="/ensembles/new" className="rounded-md bg-accent px-3 py-1.5 font-medium text-white hover:bg-accent-strong">New ensemble</Link>
            <Link href="/ensembles/new?example=1" className="self-center text-accent hover:underline">start from the example</Link>
          </div>
        </Card>
        <Card title="2 · As a file, over HTTP">
          <p className="text-sm mb-2">Save the example below as <span className="mono">spec.json</span> (YAML works too) and post it with an API token:</p>
          <pre className="mono text-xs bg-paper-sunken rounded p-2 overflow-x-auto">{CURL}</pre>
          <p className="text-xxs text-ink-faint mt-1">The spec&apos;s JSON Schema is at <a className="mono text-accent hover:underline" href="/api/v1/schemas/ensemble-spec">/api/v1/schemas/ensemble-spec</a>, for your editor.</p>
        </Card>
        <Card title="3 · From the command line">
          <p className="text-sm mb-2">The <span className="mono">ergodex</span> client ships with the package. Make an API token under Account, then submit, look at the runs, and fetch the estimates:</p>
          <pre className="mono text-xs bg-paper-sunken rounded p-2 overflow-x-auto">{CLI}</pre>
        </Card>
      </div>
      <Card title="Example spec · ising2d temperature scan">
        <div className="flex justify-between items-baseline mb-2">
          <p className="text-sm text-ink-soft">7 temperatures from 2.0 to 2.6 across T<sub>c</sub> ≈ 2.269, 2 replicas each: 14 runs on a 16×16 lattice.</p>
          <CopyButton text={EXAMPLE_SPEC_JSON} label="Copy spec" />
        </div>
        <pre className="mono text-xs bg-paper-sunken rounded p-3 overflow-auto max-h-96" data-testid="example-spec">{EXAMPLE_SPEC_JSON}</pre>
      </Card>
    </div>
  );
}

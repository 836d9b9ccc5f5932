// A provenance page's body: downloads (PROV-JSON, CSV and JSON listing), the graph, then the chain.
import type { ProvDocument } from "@/lib/provenance/prov-document";
import { provChain } from "@/lib/provenance/prov-chain";
import { provGraph } from "@/lib/provenance/prov-graph";
import { Card } from "@/components/ui/card";
import { ProvChainView } from "./prov-chain-view";
import { ProvGraphSvg } from "./prov-graph-svg";

/** `api` is the document's route (/api/v1/provenance/<kind>/<id>); `people` offers person links to the audit trail. */
export function ProvenanceView({ doc, api, people, focus, children }: { doc: ProvDocument; api: string; people: boolean; focus?: string; children?: React.ReactNode }) {
  const graph = provGraph(doc, { people });
  const steps = provChain(doc, { people });
  const count = (k: keyof ProvDocument) => Object.keys(doc[k]).length;
  return (
    <div className="space-y-4">
      <div className="flex flex-wrap items-center gap-4 text-sm" data-testid="prov-downloads">
        <a href={api} download className="rounded-md bg-accent text-white px-3 py-1.5 font-medium hover:bg-accent-strong" data-testid="download-prov-json">Download PROV-JSON</a>
        <a href={`${api}?format=listing-csv`} className="text-accent hover:underline">Listing (CSV)</a>
        <a href={`${api}?format=listing-json`} className="text-accent hover:underline">Listing (JSON)</a>
        <span className="text-ink-soft num">{count("entity")} entities · {count("activity")} activities · {count("agent")} agents</span>
      </div>
      {children}
      <Card title="Graph">
        <p className="text-xs text-ink-soft mb-2">
          Left to right in the order things happened: people and software, the inputs, the run, its archived files, the import, series and estimates.
          {graph.compact ? " Large documents are drawn compact (runs and point estimates); the chain below lists everything." : ""} Click a box to open its page.
        </p>
        <ProvGraphSvg graph={graph} focus={focus} />
      </Card>
      <Card title="Chain">
        <ProvChainView steps={steps} />
      </Card>
    </div>
  );
}

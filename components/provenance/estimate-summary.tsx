// The estimate itself above its provenance: value in concise notation (full values on hover), τ_int, the analysis choices.
import type { EstimateFacts } from "@/lib/provenance/gather";
import { concise } from "@/lib/format";
import { Card } from "@/components/ui/card";
import { Time } from "@/components/ui/time";

/** One estimate's numbers and how they were made. */
export function EstimateSummary({ e }: { e: EstimateFacts }) {
  return (
    <Card title="Estimate">
      <dl className="grid grid-cols-[10rem_1fr] gap-y-1 text-sm" data-testid="estimate-summary">
        <dt className="text-ink-soft">{e.observable}</dt>
        <dd className="num font-medium" title={`mean ${e.mean}, error ${e.error}`}>{concise(e.mean, e.error)}</dd>
        <dt className="text-ink-soft">τ_int</dt><dd className="num">{e.tauInt === null ? "—" : Number(e.tauInt.toPrecision(4))}</dd>
        <dt className="text-ink-soft">N · cut · window</dt><dd className="num">{e.n} · {e.thermCut} · {e.window ?? "—"}</dd>
        <dt className="text-ink-soft">method · analysis</dt><dd><span className="mono">{e.method}</span> · <span className="mono">{e.analysisVersion}</span></dd>
        <dt className="text-ink-soft">version</dt><dd className="num">{e.version}{e.isCurrent ? " (current)" : " (superseded)"}</dd>
        <dt className="text-ink-soft">cut chosen</dt><dd>{e.chosenById ? <>by hand{e.chosenAt ? <>, <Time at={e.chosenAt} /></> : null}</> : "automatically"}</dd>
      </dl>
    </Card>
  );
}

import Link from "next/link";
import { notFound } from "next/navigation";
import { hasRole, pageIdentity } from "@/lib/auth/page-identity";
import { PIS } from "@/lib/auth/roles";
import { checkScope } from "@/lib/auth/scope";
import { AppError } from "@/lib/errors";
import { gatherEstimates } from "@/lib/provenance/gather";
import { estimateTarget, provForEstimate } from "@/lib/provenance/prov-for-estimate";
import { ancestry } from "@/lib/provenance/ancestry";
import { PageHeader } from "@/components/ui/page-header";
import { ProvenanceView } from "@/components/provenance/provenance-view";
import { EstimateSummary } from "@/components/provenance/estimate-summary";

export const metadata = { title: "Estimate provenance" };
export const dynamic = "force-dynamic";

export default async function EstimateProvenancePage({ params }: { params: Promise<{ id: string }> }) {
  const id = (await params).id.toLowerCase();
  const who = await pageIdentity();
  const target = await estimateTarget(id);
  if (!target) notFound();
  try { checkScope(who, target, "read"); } catch (err) { if (err instanceof AppError) notFound(); throw err; }
  const [[e], doc] = await Promise.all([gatherEstimates([id]), provForEstimate(id)]);
  return (
    <>
      <PageHeader title={`Provenance of ${e.observable} (${e.scope === "point" ? "point" : "run"} estimate)`} purpose="How this number was derived: from which series or replicas, with which analysis version, cut and window, and who chose them."
        actions={<div className="flex gap-4 text-sm self-center">{e.runId ? <Link href={`/provenance/runs/${e.runId}`} className="text-accent hover:underline">its run&apos;s provenance →</Link> : null}<Link href={`/provenance/ensembles/${e.ensembleId}`} className="text-accent hover:underline">its ensemble&apos;s provenance →</Link></div>} />
      <p className="mono text-xs text-ink-faint -mt-4 mb-4">{id}</p>
      {/* The page shows what this estimate rests on; the download is the whole document of its run(s). */}
      <ProvenanceView doc={ancestry(doc, `est:${id}`)} api={`/api/v1/provenance/estimates/${id}`} people={hasRole(who, PIS)} focus={`est:${id}`}>
        <EstimateSummary e={JSON.parse(JSON.stringify(e))} />
      </ProvenanceView>
    </>
  );
}

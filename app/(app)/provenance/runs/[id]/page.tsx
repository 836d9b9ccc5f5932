import Link from "next/link";
import { notFound } from "next/navigation";
import { hasRole, pageIdentity } from "@/lib/auth/page-identity";
import { PIS, RESEARCHERS } from "@/lib/auth/roles";
import { checkScope } from "@/lib/auth/scope";
import { AppError } from "@/lib/errors";
import { runTarget } from "@/lib/ensembles/ensemble-target";
import { provForRun } from "@/lib/provenance/prov-for";
import { replaysOfRun } from "@/lib/provenance/replay/replay-run";
import { PageHeader } from "@/components/ui/page-header";
import { Card } from "@/components/ui/card";
import { ProvenanceView } from "@/components/provenance/provenance-view";
import { ReplayPanel } from "@/components/provenance/replay-panel";

export const metadata = { title: "Run provenance" };
export const dynamic = "force-dynamic";

export default async function RunProvenancePage({ params }: { params: Promise<{ id: string }> }) {
  const id = (await params).id.toLowerCase();
  const who = await pageIdentity();
  const target = await runTarget(id);
  if (!target) notFound();
  try { checkScope(who, target, "read"); } catch (err) { if (err instanceof AppError) notFound(); throw err; }
  let mayAct = hasRole(who, RESEARCHERS);
  try { checkScope(who, target, "act"); } catch { mayAct = false; }
  const [doc, replays] = await Promise.all([provForRun(id), replaysOfRun(id)]);
  const ensembleId = Object.keys(doc.entity).find((k) => k.startsWith("ens:"))?.slice(4, -"/spec".length);
  return (
    <>
      <PageHeader title={`Provenance of run ${id.slice(0, 8)}`} purpose="Who ran this chain, with which code, seed and input, what it produced and what was derived from it."
        actions={<div className="flex gap-4 text-sm self-center"><Link href={`/runs/${id}`} className="text-accent hover:underline">the run →</Link>{ensembleId ? <Link href={`/provenance/ensembles/${ensembleId}`} className="text-accent hover:underline">its ensemble&apos;s provenance →</Link> : null}</div>} />
      <p className="mono text-xs text-ink-faint -mt-4 mb-4">{id}</p>
      <ProvenanceView doc={doc} api={`/api/v1/provenance/runs/${id}`} people={hasRole(who, PIS)}>
        <Card title="Replay">
          <ReplayPanel runId={id} may={mayAct} initial={JSON.parse(JSON.stringify(replays))} />
        </Card>
      </ProvenanceView>
    </>
  );
}

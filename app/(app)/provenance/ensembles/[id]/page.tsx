import Link from "next/link";
import { notFound } from "next/navigation";
import { hasRole, pageIdentity } from "@/lib/auth/page-identity";
import { PIS } from "@/lib/auth/roles";
import { checkScope } from "@/lib/auth/scope";
import { AppError } from "@/lib/errors";
import { ensembleTarget } from "@/lib/ensembles/ensemble-target";
import { provForEnsemble } from "@/lib/provenance/prov-for";
import { PageHeader } from "@/components/ui/page-header";
import { ProvenanceView } from "@/components/provenance/provenance-view";

export const metadata = { title: "Ensemble provenance" };
export const dynamic = "force-dynamic";

export default async function EnsembleProvenancePage({ params }: { params: Promise<{ id: string }> }) {
  const id = (await params).id.toLowerCase();
  const who = await pageIdentity();
  const target = await ensembleTarget(id);
  if (!target) notFound();
  try { checkScope(who, target, "read"); } catch (err) { if (err instanceof AppError) notFound(); throw err; }
  const doc = await provForEnsemble(id);
  const label = doc.entity[`ens:${id}/spec`]?.["prov:label"];
  return (
    <>
      <PageHeader title={`Provenance of ${typeof label === "string" ? label : `ensemble ${id.slice(0, 8)}`}`} purpose="Every chain of this ensemble and every point estimate combined from them, traced to code, seed and archived file."
        actions={<Link href={`/ensembles/${id}`} className="text-sm text-accent hover:underline self-center">the ensemble →</Link>} />
      <ProvenanceView doc={doc} api={`/api/v1/provenance/ensembles/${id}`} people={hasRole(who, PIS)} />
    </>
  );
}

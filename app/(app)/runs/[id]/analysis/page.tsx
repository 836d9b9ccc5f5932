import Link from "next/link";
import { notFound } from "next/navigation";
import { pageIdentity } from "@/lib/auth/page-identity";
import { checkScope } from "@/lib/auth/scope";
import { AppError } from "@/lib/errors";
import { runTarget } from "@/lib/ensembles/ensemble-target";
import { seriesNames } from "@/lib/importer/load-series";
import { db } from "@/models";
import { PageHeader } from "@/components/ui/page-header";
import { AnalysisView } from "@/components/analysis/analysis-view";
import { SpectrumView } from "@/components/analysis/spectrum-view";

export const metadata = { title: "Run analysis" };

export default async function RunAnalysisPage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  const who = await pageIdentity();
  const target = await runTarget(id);
  if (!target) notFound();
  try { checkScope(who, target, "read"); } catch (err) { if (err instanceof AppError) notFound(); throw err; }
  // which observables have a stored series, and whether the bundle carried a spectrum file
  const [observables, spectrum] = await Promise.all([
    seriesNames(id),
    db().RunArtifact.count({ where: { runId: id, path: "spectrum.csv" } }),
  ]);
  return (
    <>
      <PageHeader title={`Analysis of run ${id.slice(0, 8)}`} purpose="Check thermalisation and autocorrelation of one run, try another cut or window, and save it as a new estimate version."
        actions={<Link href={`/runs/${id}`} className="text-sm text-accent hover:underline self-center">← the run</Link>} />
      <AnalysisView runId={id} observables={observables} />
      {spectrum > 0 ? <div className="mt-4"><SpectrumView runId={id} /></div> : null}
    </>
  );
}

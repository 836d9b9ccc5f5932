import Link from "next/link";
import { notFound } from "next/navigation";
import { pageIdentity, hasRole } from "@/lib/auth/page-identity";
import { RESEARCHERS } from "@/lib/auth/roles";
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
  const m = db();
  const [observables, spectrum, members] = await Promise.all([
    seriesNames(id),
    m.RunArtifact.count({ where: { runId: id, path: "spectrum.csv" } }),
    target.groupId === null ? [] : m.Membership.findAll({ where: { groupId: target.groupId }, include: [{ association: "user", attributes: ["id", "name"] }] }),
  ]);
  // names of the people who may have chosen a stored version (the run's group)
  const people = Object.fromEntries(members.map((x) => { const u = (x as unknown as { user?: { id: string; name: string } }).user; return u ? [u.id, u.name] : null; }).filter((e): e is [string, string] => e !== null));
  const canSave = hasRole(who, RESEARCHERS);
  return (
    <>
      <PageHeader title={`Analysis of run ${id.slice(0, 8)}`} purpose="Check thermalisation and autocorrelation of one run, try another cut or window, and save it as a new estimate version."
        actions={<Link href={`/runs/${id}`} className="text-sm text-accent hover:underline self-center">← the run</Link>} />
      <AnalysisView runId={id} observables={observables.filter((o) => o !== "sweep")} people={people} canSave={canSave} />
      {spectrum > 0 ? <div className="mt-4"><SpectrumView runId={id} /></div> : null}
    </>
  );
}

import Link from "next/link";
import { notFound } from "next/navigation";
import { pageIdentity, hasRole } from "@/lib/auth/page-identity";
import { RESEARCHERS } from "@/lib/auth/roles";
import { checkScope } from "@/lib/auth/scope";
import { AppError } from "@/lib/errors";
import { ensembleTarget } from "@/lib/ensembles/ensemble-target";
import { ensembleDetail } from "@/lib/ensembles/ensemble-detail";
import { PageHeader } from "@/components/ui/page-header";
import { EnsembleView } from "@/components/ensembles/ensemble-view";
import { PlanOutcomeCard } from "@/components/planner/plan-outcome-card";
import type { EnsembleDetail } from "@/lib/hooks/use-ensemble";

export const metadata = { title: "Ensemble" };

const allowed = (fn: () => void) => { try { fn(); return true; } catch (err) { if (err instanceof AppError) return false; throw err; } };

export default async function EnsemblePage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  const who = await pageIdentity();
  // the same group-scope rule as the API: not a member (nor coordinator/admin) → not found
  const target = await ensembleTarget(id);
  if (!target || !allowed(() => checkScope(who, target, "read"))) notFound();
  const detail = JSON.parse(JSON.stringify(await ensembleDetail(id))) as EnsembleDetail;
  const canAct = hasRole(who, RESEARCHERS) && allowed(() => checkScope(who, target, "act"));
  return (
    <>
      <PageHeader title={detail.name} purpose={detail.description || "One sampler at many parameter points: every run's state, live, and what the ensemble spent."}
        actions={<Link href="/ensembles" className="text-sm text-accent hover:underline self-center">← all ensembles</Link>} />
      <EnsembleView initial={detail} canAct={canAct} />
      <PlanOutcomeCard who={who} ensembleId={id} tags={detail.tags ?? []} />
    </>
  );
}

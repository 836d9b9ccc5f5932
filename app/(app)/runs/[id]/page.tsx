import Link from "next/link";
import { notFound } from "next/navigation";
import { pageIdentity } from "@/lib/auth/page-identity";
import { checkScope } from "@/lib/auth/scope";
import { AppError } from "@/lib/errors";
import { runTarget } from "@/lib/ensembles/ensemble-target";
import { runDetail } from "@/lib/ensembles/run-detail";
import { PageHeader } from "@/components/ui/page-header";
import { RunView } from "@/components/runs/run-view";
import type { RunDetail } from "@/lib/hooks/use-run";

export const metadata = { title: "Run" };

export default async function RunPage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  const who = await pageIdentity();
  const target = await runTarget(id);
  if (!target) notFound();
  try { checkScope(who, target, "read"); } catch (err) { if (err instanceof AppError) notFound(); throw err; }
  const run = JSON.parse(JSON.stringify(await runDetail(id))) as RunDetail;
  return (
    <>
      <PageHeader title={`Run ${run.id.slice(0, 8)}`} purpose="One Markov chain: where and how it ran, every state change, and what it measured."
        actions={<Link href={`/ensembles/${run.ensembleId}`} className="text-sm text-accent hover:underline self-center">← its ensemble</Link>} />
      <p className="mono text-xs text-ink-faint -mt-4 mb-4" data-testid="run-id">{run.id}</p>
      <RunView initial={run} />
    </>
  );
}

import { pageIdentity } from "@/lib/auth/page-identity";
import { listPlannerRecord } from "@/lib/planner/list-record";
import { PageHeader } from "@/components/ui/page-header";
import { PlannerRecord } from "@/components/planner/planner-record";

export const metadata = { title: "Planner" };
export const dynamic = "force-dynamic";

export default async function PlannerPage({ searchParams }: { searchParams: Promise<{ ensemble?: string }> }) {
  const who = await pageIdentity();
  const { ensemble } = await searchParams;
  const uuid = ensemble && /^[0-9a-f-]{36}$/i.test(ensemble) ? ensemble : undefined;
  const rows = await listPlannerRecord(who, { ensembleId: uuid });
  return (
    <>
      <PageHeader title="Planner" purpose="How the planner's predicted errors compared with what ended ensembles achieved: its track record." />
      <PlannerRecord rows={rows} />
    </>
  );
}

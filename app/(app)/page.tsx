import { pageIdentity } from "@/lib/auth/page-identity";
import { overviewFor } from "@/lib/overview/overview";
import { PageHeader } from "@/components/ui/page-header";
import { AllocationsCard } from "@/components/overview/allocations-card";
import { RunStatesCard } from "@/components/overview/run-states-card";
import { ActivityCard } from "@/components/overview/activity-card";

export const metadata = { title: "Overview" };

export default async function OverviewPage() {
  const who = await pageIdentity();
  const data = await overviewFor(who);
  return (
    <>
      <PageHeader title="Overview" purpose="Your groups' allocations, the state of every run, and what happened lately." />
      <div className="grid gap-4 lg:grid-cols-3">
        <AllocationsCard allocations={data.allocations} className="lg:col-span-2" />
        <RunStatesCard counts={data.runsByState} />
        <ActivityCard items={data.activity.map((a) => ({ ...a, at: a.at.toISOString() }))} className="lg:col-span-3" />
      </div>
    </>
  );
}

import { pageIdentity } from "@/lib/auth/page-identity";
import { overviewFor } from "@/lib/overview/overview";
import { PageHeader } from "@/components/ui/page-header";
import { AllocationsCard } from "@/components/overview/allocations-card";

export const metadata = { title: "Allocations" };

export default async function AllocationsPage() {
  const who = await pageIdentity();
  const { allocations } = await overviewFor(who);
  return (
    <>
      <PageHeader title="Allocations" purpose="Core-hours granted to each group for a period, and how much is charged, held and left." />
      <AllocationsCard allocations={allocations} />
    </>
  );
}

import { pageIdentity, hasRole } from "@/lib/auth/page-identity";
import { COORDINATORS } from "@/lib/auth/roles";
import { listAllocations } from "@/lib/allocations/list-allocations";
import { db } from "@/models";
import { PageHeader } from "@/components/ui/page-header";
import { Card } from "@/components/ui/card";
import { AllocationList } from "@/components/allocations/allocation-list";
import { GrantForm } from "@/components/allocations/grant-form";

export const metadata = { title: "Allocations" };
export const dynamic = "force-dynamic";

export default async function AllocationsPage() {
  const who = await pageIdentity();
  const staff = hasRole(who, COORDINATORS);
  const rows = await listAllocations(who);
  const [groups, clusters] = staff
    ? await Promise.all([db().Group.findAll({ order: [["name", "ASC"]], attributes: ["id", "name"] }), db().Cluster.findAll({ where: { active: true }, order: [["name", "ASC"]], attributes: ["id", "name"] })])
    : [[], []];
  return (
    <>
      <PageHeader title="Allocations" purpose="Core-hours granted to each group for a period: what is charged, held and free, and how fast it burns." />
      <div className="space-y-4">
        <Card title="Allocations"><AllocationList rows={rows} /></Card>
        {staff ? (
          <Card title="Grant an allocation">
            <GrantForm groups={groups.map((g) => ({ id: g.id, name: g.name }))} clusters={clusters.map((c) => ({ id: c.id, name: c.name }))} />
          </Card>
        ) : null}
      </div>
    </>
  );
}

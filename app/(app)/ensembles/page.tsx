import Link from "next/link";
import { Suspense } from "react";
import { Op } from "sequelize";
import { db } from "@/models";
import { pageIdentity, hasRole } from "@/lib/auth/page-identity";
import { RESEARCHERS } from "@/lib/auth/roles";
import { visibleGroupIds } from "@/lib/auth/visible-groups";
import { PageHeader } from "@/components/ui/page-header";
import { EnsemblesTable } from "@/components/ensembles/ensembles-table";

export const metadata = { title: "Ensembles" };

export default async function EnsemblesPage() {
  const who = await pageIdentity();
  const groups = visibleGroupIds(who);
  const m = db();
  // filter choices: the samplers, and the people whose ensembles this viewer may see
  const [samplers, owners] = await Promise.all([
    m.Sampler.findAll({ attributes: ["name"], group: ["name"], order: [["name", "ASC"]] }),
    m.User.findAll({
      attributes: ["id", "name"],
      where: groups === null ? {} : { id: { [Op.in]: (await m.Membership.findAll({ where: { groupId: groups }, attributes: ["userId"] })).map((x) => x.userId) } },
      order: [["name", "ASC"]],
    }),
  ]);
  return (
    <>
      <PageHeader title="Ensembles" purpose="Submit ensemble specs, watch their runs and resubmit what failed."
        actions={hasRole(who, RESEARCHERS) ? <Link href="/ensembles/new" className="rounded-md bg-accent px-3 py-1.5 text-sm font-medium text-white hover:bg-accent-strong">New ensemble</Link> : null} />
      <Suspense fallback={<p className="text-sm text-ink-soft">Loading ensembles…</p>}>
        <EnsemblesTable options={{ samplers: samplers.map((s) => s.name), owners: owners.map((o) => ({ id: o.id, name: o.name })) }} />
      </Suspense>
    </>
  );
}

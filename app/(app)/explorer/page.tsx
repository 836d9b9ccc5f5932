import { Suspense } from "react";
import { Op } from "sequelize";
import { db } from "@/models";
import { pageIdentity } from "@/lib/auth/page-identity";
import { visibleGroupIds } from "@/lib/auth/visible-groups";
import { PageHeader } from "@/components/ui/page-header";
import { ExplorerView } from "@/components/explorer/explorer-view";
import type { ExplorerOptions } from "@/components/explorer/explorer-options";

export const metadata = { title: "Explorer" };

/** Recent ensembles offered in the ensemble filter; older ones are still reachable by URL. */
const ENSEMBLE_CHOICES = 300;

export default async function ExplorerPage() {
  const who = await pageIdentity();
  const groups = visibleGroupIds(who);
  const m = db();
  const inGroups = groups === null ? {} : { groupId: { [Op.in]: groups } };
  const [samplers, ensembles, memberIds] = await Promise.all([
    m.Sampler.findAll({ attributes: ["name", "paramsSchema", "observables"], order: [["name", "ASC"], ["version", "ASC"]] }),
    m.Ensemble.findAll({ where: inGroups, attributes: ["id", "name"], include: [{ association: "sampler", attributes: ["name"] }], order: [["createdAt", "DESC"]], limit: ENSEMBLE_CHOICES }),
    groups === null ? null : m.Membership.findAll({ where: { groupId: groups }, attributes: ["userId"] }).then((r) => r.map((x) => x.userId)),
  ]);
  const owners = await m.User.findAll({ attributes: ["id", "name"], where: memberIds === null ? {} : { id: { [Op.in]: memberIds } }, order: [["name", "ASC"]] });
  // one entry per sampler name: the union over its versions
  const byName = new Map<string, { observables: Set<string>; params: Set<string> }>();
  for (const s of samplers) {
    const e = byName.get(s.name) ?? { observables: new Set(), params: new Set() };
    for (const o of s.observables ?? []) e.observables.add(o.name);
    for (const p of Object.keys((s.paramsSchema as { properties?: Record<string, unknown> }).properties ?? {})) e.params.add(p);
    byName.set(s.name, e);
  }
  const options: ExplorerOptions = {
    samplers: [...byName].map(([name, e]) => ({ name, observables: [...e.observables], params: [...e.params] })),
    owners: owners.map((o) => ({ id: o.id, name: o.name })),
    ensembles: ensembles.map((e) => ({ id: e.id, name: e.name, sampler: e.sampler?.name ?? "" })),
  };
  return (
    <>
      <PageHeader title="Explorer" purpose="Find, compare and plot estimates across the archive: filter, plot an observable against a parameter, export what you see." />
      <Suspense fallback={<p className="text-sm text-ink-soft">Loading the explorer…</p>}>
        <ExplorerView options={options} />
      </Suspense>
    </>
  );
}

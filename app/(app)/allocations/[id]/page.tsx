import { notFound } from "next/navigation";
import { pageIdentity, hasRole } from "@/lib/auth/page-identity";
import { COORDINATORS } from "@/lib/auth/roles";
import { checkScope } from "@/lib/auth/scope";
import { AppError } from "@/lib/errors";
import { allocationTarget } from "@/lib/allocations/allocation-target";
import { allocationUsage } from "@/lib/allocations/usage";
import { coreHours, utc } from "@/lib/format";
import { PageHeader } from "@/components/ui/page-header";
import { Card } from "@/components/ui/card";
import { BalanceTiles } from "@/components/allocations/balance-tiles";
import { BurnChart } from "@/components/allocations/burn-chart";
import { EnsembleUsage, PersonUsage } from "@/components/allocations/usage-tables";
import { ManagePanel } from "@/components/allocations/manage-panel";
import { CapForm } from "@/components/allocations/cap-form";

export const metadata = { title: "Allocation" };
export const dynamic = "force-dynamic";

export default async function AllocationPage({ params }: { params: Promise<{ id: string }> }) {
  const who = await pageIdentity();
  const { id } = await params;
  const target = await allocationTarget(id);
  if (!target) notFound();
  try { checkScope(who, target, "read"); } catch (err) { if (err instanceof AppError) notFound(); throw err; }
  const u = await allocationUsage(who, id);
  const staff = hasRole(who, COORDINATORS);
  const a = u.allocation;
  const today = new Date().toISOString().slice(0, 10);
  return (
    <>
      <PageHeader
        title={a.name}
        purpose={`${a.group}${a.cluster ? ` on ${a.cluster}` : ""} · ${a.periodStart.slice(0, 10)} → ${a.periodEnd.slice(0, 10)} · charged core-hours against even spending, and who uses them.`}
        actions={<a href={`/api/v1/allocations/${a.id}/report`} className="rounded-md border border-line-strong px-3 py-1.5 text-sm hover:bg-paper-sunken" data-testid="csv-link">Monthly CSV</a>}
      />
      {a.state !== "active" ? (
        <p role="status" className="mb-4 rounded-md border border-danger bg-danger-soft px-3 py-2 text-sm" data-testid="state-banner">
          <strong className="text-danger">{a.state === "suspended" ? "❚❚ Suspended" : "■ Closed"}</strong> — {a.stateReason}. New submissions are refused.
        </p>
      ) : null}
      <div className="space-y-4">
        <BalanceTiles u={u} />
        <Card title="Charged over time"><BurnChart points={u.chart} today={today} given={u.balance.given} /></Card>
        <Card title="Caps">
          <ul className="text-sm space-y-1 mb-3" data-testid="caps">
            <li>Per person (default): <strong>{u.caps.everyone ?? "none"}</strong></li>
            <li>Per ensemble (ceiling): <strong>{u.caps.ensemble ? `${u.caps.ensemble}${u.caps.ensembleLimit !== null ? ` = ${coreHours(u.caps.ensembleLimit)} core-hours now` : ""}` : "none"}</strong></li>
            {u.caps.persons.map((c) => <li key={c.userId}>{u.byPerson.find((p) => p.userId === c.userId)?.name ?? c.userId}: <strong>{c.rule}</strong></li>)}
          </ul>
          <p className="text-xs text-ink-faint mb-3">A person is warned in the submit form and told by e-mail once their use or holds reach 80 % of their cap.</p>
          {staff && a.state !== "closed" ? <CapForm id={a.id} people={u.byPerson.map((p) => ({ userId: p.userId, name: p.name }))} /> : null}
        </Card>
        <Card title={u.full ? "Usage by person" : "Your usage"}><PersonUsage rows={u.byPerson} /></Card>
        <Card title={u.full ? "Usage by ensemble" : "Your ensembles"}><EnsembleUsage rows={u.byEnsemble} /></Card>
        {staff ? <Card title="Manage"><ManagePanel id={a.id} state={a.state} /></Card> : null}
        <Card title="Who to ask">
          <p className="text-sm">{u.contacts.length ? u.contacts.map((c) => `${c.name} <${c.email}>`).join(", ") : "no coordinator is registered; ask an admin"}</p>
        </Card>
        {u.full ? (
          <Card title="History">
            <table className="data text-sm" data-testid="history">
              <thead><tr><th>When</th><th>What</th><th className="n">Core-hours</th><th>Who</th><th>Reason</th></tr></thead>
              <tbody>
                {[...u.ledger.map((l) => ({ at: l.at, what: l.kind === "grant" ? "grant / top-up" : "adjustment", hours: l.coreHours as number | null, who: l.who, reason: l.note })),
                  ...u.history.map((h) => ({ at: h.at.toISOString(), what: `state → ${h.state}`, hours: null, who: h.actorName, reason: h.reason })),
                  ...u.capChanges.map((c) => ({ at: c.at, what: `cap ${c.subject === "person" ? `for ${c.person}` : c.subject === "everyone" ? "for everyone" : "per ensemble"}: ${c.rule}`, hours: null, who: c.who, reason: c.reason }))]
                  .sort((x, y) => y.at.localeCompare(x.at))
                  .map((r, k) => <tr key={k}><td className="num text-xs whitespace-nowrap" title={utc(r.at)}>{r.at.slice(0, 16).replace("T", " ")}</td><td>{r.what}</td><td className="n">{r.hours === null ? "" : coreHours(r.hours)}</td><td>{r.who ?? "system"}</td><td>{r.reason}</td></tr>)}
              </tbody>
            </table>
          </Card>
        ) : null}
      </div>
    </>
  );
}

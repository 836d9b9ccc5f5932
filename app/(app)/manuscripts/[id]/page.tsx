import Link from "next/link";
import { notFound } from "next/navigation";
import { pageIdentity } from "@/lib/auth/page-identity";
import { checkScope } from "@/lib/auth/scope";
import { AppError } from "@/lib/errors";
import { manuscriptTarget } from "@/lib/manuscripts/access";
import { manuscriptDetail } from "@/lib/manuscripts/list-manuscripts";
import { collaboratorCandidates, groupViews } from "@/lib/manuscripts/page-options";
import { db } from "@/models";
import { Card } from "@/components/ui/card";
import { PageHeader } from "@/components/ui/page-header";
import { Time } from "@/components/ui/time";
import { AddExhibitForm } from "@/components/manuscripts/add-exhibit-form";
import { Collaborators } from "@/components/manuscripts/collaborators";
import { ExhibitCard } from "@/components/manuscripts/exhibit-card";
import { ManuscriptControls } from "@/components/manuscripts/manuscript-controls";
import { ManuscriptHistory } from "@/components/manuscripts/manuscript-history";
import { VerifyPanel, type Verification } from "@/components/manuscripts/verify-panel";

export const metadata = { title: "Manuscript" };
export const dynamic = "force-dynamic";

export default async function ManuscriptPage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  const who = await pageIdentity();
  const target = await manuscriptTarget(id);
  if (!target) notFound();
  try { checkScope(who, target, "read"); } catch (err) { if (err instanceof AppError) notFound(); throw err; }
  const ms = await manuscriptDetail(who, id);
  const frozen = ms.state === "frozen";
  const group = await db().Group.findByPk(ms.groupId, { attributes: ["name"] });
  const leads = who.role === "admin" || (who.role === "pi" && who.leadGroupIds.includes(ms.groupId));
  const [candidates, views] = await Promise.all([
    !frozen && (leads || ms.createdBy.id === who.userId) ? collaboratorCandidates({ groupId: ms.groupId, createdById: ms.createdBy.id }, ms.collaborators.map((c) => c.id)) : [],
    ms.may.edit ? groupViews(who, ms.groupId) : [],
  ]);
  // a verification speaks for the snapshot it checked: one from before the latest freeze (or of a draft) is stale
  const v = ms.latestVerification;
  const latest = frozen && v && ms.frozenAt && new Date(v.createdAt) >= new Date(ms.frozenAt) ? (v as unknown as Verification) : null;
  const statusOf = new Map((latest?.report?.exhibits ?? []).map((x) => [x.label, x.status as "verified" | "differs"]));
  const sum = (f: (p: (typeof ms.exhibits)[number]["preview"]) => number) => ms.exhibits.reduce((n, x) => n + f(x.preview), 0);
  // exhibits may share runs and files: the snapshot's totals count each once
  const distinct = (f: (s: NonNullable<(typeof ms.exhibits)[number]["snapshot"]>) => string[]) => new Set(ms.exhibits.flatMap((x) => (x.snapshot ? f(x.snapshot) : []))).size;
  return (
    <>
      <PageHeader title={ms.title} purpose="The figures and tables of one paper, the saved views behind them and, once frozen, the exact numbers and files they rest on." />
      <div className="mb-4 flex flex-wrap items-center gap-x-4 gap-y-1 text-sm" data-testid="manuscript-state" data-state={ms.state}>
        {frozen
          ? <span className="rounded-full bg-accent-soft px-2.5 py-0.5 font-medium text-accent-strong">❄ Frozen{ms.frozenAt ? <> <Time at={ms.frozenAt} /></> : null}{ms.frozenBy ? ` by ${ms.frozenBy.name}` : ""}</span>
          : <span className="rounded-full bg-paper-sunken px-2.5 py-0.5 font-medium">✎ Draft</span>}
        <span><span className="text-ink-soft">Group</span> {group?.name}</span>
        <span><span className="text-ink-soft">Target journal</span> {ms.journal ?? "—"}</span>
        <Link className="text-accent hover:underline" href="/manuscripts">All manuscripts</Link>
      </div>
      <div className="mb-4"><Collaborators id={ms.id} createdBy={ms.createdBy} collaborators={ms.collaborators} candidates={candidates} /></div>
      <div className="mb-4"><ManuscriptControls id={ms.id} may={ms.may} exhibits={ms.exhibits.length} estimates={sum((p) => p.estimates)} /></div>
      {frozen ? (
        <Card title="Snapshot" className="mb-4">
          <p className="text-sm tabular-nums" data-testid="snapshot-summary">
            {ms.exhibits.length} exhibit{ms.exhibits.length === 1 ? "" : "s"} rest on {distinct((s) => s.estimates.flatMap((e) => [e.id, ...e.inputs])).toLocaleString("en-GB")} estimates
            (the point estimates shown and the run estimates they combine), {distinct((s) => s.runs).toLocaleString("en-GB")} runs and {distinct((s) => s.files.map((f) => f.sha256)).toLocaleString("en-GB")} archived files.
            None of them can be changed or deleted while frozen.
          </p>
          <div className="mt-3"><VerifyPanel id={ms.id} may={ms.may.verify} latest={latest} /></div>
        </Card>
      ) : null}
      <div className="space-y-4" data-testid="exhibits">
        {ms.exhibits.length === 0 ? <p className="text-sm text-ink-soft">No exhibits yet. Each figure or table of the paper becomes one, with the saved explorer view behind it.</p> : null}
        {ms.exhibits.map((x) => <ExhibitCard key={x.id} x={x} verified={statusOf.get(x.label) ?? null} />)}
      </div>
      {ms.may.edit ? (
        <div className="mt-6">
          <h2 className="mb-2 text-xs font-medium uppercase tracking-wide text-ink-soft">Add an exhibit</h2>
          <AddExhibitForm id={ms.id} views={views} />
        </div>
      ) : null}
      <div className="mt-8">
        <h2 className="mb-2 text-xs font-medium uppercase tracking-wide text-ink-soft">History</h2>
        <ManuscriptHistory entries={ms.history} />
      </div>
    </>
  );
}

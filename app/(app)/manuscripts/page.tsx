import Link from "next/link";
import { pageIdentity } from "@/lib/auth/page-identity";
import { listManuscripts } from "@/lib/manuscripts/list-manuscripts";
import { db } from "@/models";
import { PageHeader } from "@/components/ui/page-header";
import { CreateManuscriptForm } from "@/components/manuscripts/create-manuscript-form";
import { Time } from "@/components/ui/time";

export const metadata = { title: "Manuscripts" };
export const dynamic = "force-dynamic";

export default async function ManuscriptsPage() {
  const who = await pageIdentity();
  const rows = await listManuscripts(who);
  const leads = who.role === "admin" ? await db().Group.findAll({ order: [["name", "ASC"]] }) : await db().Group.findAll({ where: { id: who.role === "pi" ? who.leadGroupIds : [] }, order: [["name", "ASC"]] });
  return (
    <>
      <PageHeader title="Manuscripts" purpose="Freeze the data behind a paper's figures and tables, verify it later, and hand collaborators a bundle they can check." />
      {leads.length ? <CreateManuscriptForm groups={leads.map((g) => ({ id: g.id, name: g.name }))} /> : null}
      {rows.length === 0 ? (
        <p className="text-sm text-ink-soft">No manuscripts yet. A PI creates one above, adds exhibits (a saved explorer view behind each figure or table) and freezes it when the paper is submitted.</p>
      ) : (
        <table className="data" data-testid="manuscripts">
          <thead><tr><th>Title</th><th>Group</th><th>Journal</th><th className="n">Exhibits</th><th>State</th></tr></thead>
          <tbody>
            {rows.map((r) => (
              <tr key={r.id}>
                <td><Link className="text-accent hover:underline" href={`/manuscripts/${r.id}`}>{r.title}</Link></td>
                <td>{r.groupName}</td><td>{r.journal ?? "—"}</td><td className="n">{r.exhibits}</td>
                <td>{r.state === "frozen" ? <>❄ frozen{r.frozenAt ? <span className="text-ink-soft"> <Time at={r.frozenAt} /></span> : null}</> : "✎ draft"}</td>
              </tr>
            ))}
          </tbody>
        </table>
      )}
    </>
  );
}

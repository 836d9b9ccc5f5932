// POST /api/v1/manuscripts/:id/exhibits – add an exhibit { label, caption?, kind, viewId | query } to a draft; 201
import { withAuth } from "@/lib/auth/guard";
import { RESEARCHERS } from "@/lib/auth/roles";
import { readJson } from "@/lib/http/read-json";
import { manuscriptTarget } from "@/lib/manuscripts/access";
import { addExhibit } from "@/lib/manuscripts/edit-manuscript";
import { exhibitBodySchema, exhibitFromBody, type ExhibitBody } from "@/lib/manuscripts/exhibit-from-view";

export const dynamic = "force-dynamic";

export const POST = withAuth<{ id: string }>({ roles: RESEARCHERS, target: (p) => manuscriptTarget(p.id), access: "read" }, async (req, { who, audit, params }) => {
  const body = await readJson<ExhibitBody>(req, exhibitBodySchema);
  const ex = await addExhibit(audit, who, params.id, await exhibitFromBody(who, body));
  return Response.json({ data: { id: ex.id, label: ex.label, kind: ex.kind, query: ex.query } }, { status: 201 });
});

// GET /api/v1/manuscripts – manuscripts of the caller's groups (all groups for coordinators and admins)
// POST /api/v1/manuscripts – create a draft { groupId, title, journal? } (a PI leading the group); 201
import { withAuth } from "@/lib/auth/guard";
import { ANY, PIS } from "@/lib/auth/roles";
import { createManuscriptSchema } from "@/lib/actions/manuscripts";
import { readJson } from "@/lib/http/read-json";
import { createManuscript } from "@/lib/manuscripts/edit-manuscript";
import { listManuscripts } from "@/lib/manuscripts/list-manuscripts";

export const dynamic = "force-dynamic";

export const GET = withAuth({ roles: ANY }, async (_req, { who }) => Response.json({ data: await listManuscripts(who) }));

export const POST = withAuth({ roles: PIS }, async (req, { who, audit }) => {
  const ms = await createManuscript(audit, who, await readJson(req, createManuscriptSchema));
  return Response.json({ data: { id: ms.id, title: ms.title, state: ms.state } }, { status: 201, headers: { location: `/api/v1/manuscripts/${ms.id}` } });
});

// GET /api/v1/manuscripts/:id – one manuscript: exhibits (with snapshots once frozen), collaborators, latest verification
import { withAuth } from "@/lib/auth/guard";
import { ANY } from "@/lib/auth/roles";
import { manuscriptTarget } from "@/lib/manuscripts/access";
import { manuscriptDetail } from "@/lib/manuscripts/list-manuscripts";

export const dynamic = "force-dynamic";

export const GET = withAuth<{ id: string }>({ roles: ANY, target: (p) => manuscriptTarget(p.id), access: "read" }, async (_req, { who, params }) =>
  Response.json({ data: await manuscriptDetail(who, params.id) }));

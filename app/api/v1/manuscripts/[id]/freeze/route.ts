// POST /api/v1/manuscripts/:id/freeze – snapshot every exhibit and protect what lies beneath (a PI leading the group, or an admin)
import { withAuth } from "@/lib/auth/guard";
import { PIS } from "@/lib/auth/roles";
import { manuscriptTarget } from "@/lib/manuscripts/access";
import { freezeManuscript } from "@/lib/manuscripts/freeze-manuscript";

export const dynamic = "force-dynamic";

export const POST = withAuth<{ id: string }>({ roles: PIS, target: (p) => manuscriptTarget(p.id), access: "read" }, async (_req, { who, audit, params }) => {
  const ms = await freezeManuscript(audit, who, params.id);
  return Response.json({ data: { id: ms.id, state: ms.state, frozenAt: ms.frozenAt } });
});

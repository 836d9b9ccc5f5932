// POST /api/v1/manuscripts/:id/verify – queue a verification of a frozen manuscript; 202 with its id
import { withAuth } from "@/lib/auth/guard";
import { RESEARCHERS } from "@/lib/auth/roles";
import { manuscriptTarget } from "@/lib/manuscripts/access";
import { requestVerification } from "@/lib/manuscripts/verify-manuscript";

export const dynamic = "force-dynamic";

export const POST = withAuth<{ id: string }>({ roles: RESEARCHERS, target: (p) => manuscriptTarget(p.id), access: "read" }, async (_req, { who, audit, params }) => {
  const id = await requestVerification(audit, who, params.id);
  return Response.json({ data: { verificationId: id } }, { status: 202, headers: { location: `/api/v1/manuscripts/${params.id}/verifications/${id}` } });
});

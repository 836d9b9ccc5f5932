// GET /api/v1/manuscripts/:id/verifications/:vid – a verification's state, progress (items done / total) and report
import { withAuth } from "@/lib/auth/guard";
import { ANY } from "@/lib/auth/roles";
import { AppError } from "@/lib/errors";
import { uuidParam } from "@/lib/http/params";
import { manuscriptTarget } from "@/lib/manuscripts/access";
import { verificationStatus } from "@/lib/manuscripts/verify-manuscript";

export const dynamic = "force-dynamic";

export const GET = withAuth<{ id: string; vid: string }>({ roles: ANY, target: (p) => manuscriptTarget(p.id), access: "read" }, async (_req, { params }) => {
  const v = await verificationStatus({ id: uuidParam(params.vid, "verification") });
  if (!v || v.manuscriptId !== params.id) throw new AppError("not_found", "verification not found");
  return Response.json({ data: v });
});

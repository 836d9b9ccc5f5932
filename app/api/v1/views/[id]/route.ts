// GET /api/v1/views/:id – one saved explorer view (members of its group, its owner, coordinators and admins)
import { withAuth } from "@/lib/auth/guard";
import { ANY } from "@/lib/auth/roles";
import { getSavedView, savedViewTarget } from "@/lib/explorer/saved-views";

export const dynamic = "force-dynamic";

export const GET = withAuth<{ id: string }>({ roles: ANY, target: (p) => savedViewTarget(p.id), access: "read" }, async (_req, { params }) =>
  Response.json({ data: await getSavedView(params.id) }));

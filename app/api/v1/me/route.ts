// GET /api/v1/me – who the caller is, their role and groups
import { withAuth } from "@/lib/auth/guard";
import { ANY } from "@/lib/auth/roles";

export const GET = withAuth({ roles: ANY }, async (_req, { who }) =>
  Response.json({ data: { id: who.userId, email: who.email, name: who.name, role: who.role, groupIds: who.groupIds, leadGroupIds: who.leadGroupIds, via: who.via } }),
);

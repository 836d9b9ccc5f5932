// GET /api/v1/groups – the groups the caller may see (own groups; all for coordinators and admins)
import { withAuth } from "@/lib/auth/guard";
import { ANY } from "@/lib/auth/roles";
import { listGroups } from "@/lib/groups/list-groups";

export const GET = withAuth({ roles: ANY }, async (_req, { who }) => Response.json({ data: await listGroups(who) }));

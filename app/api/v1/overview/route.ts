// GET /api/v1/overview – the dashboard's figures (allocations, runs by state, recent activity) in the caller's scope
import { withAuth } from "@/lib/auth/guard";
import { ANY } from "@/lib/auth/roles";
import { overviewFor } from "@/lib/overview/overview";

export const GET = withAuth({ roles: ANY }, async (_req, { who }) => Response.json({ data: await overviewFor(who) }));

// GET /api/v1/allocations – allocations in the caller's scope with balances derived from the ledger
import { withAuth } from "@/lib/auth/guard";
import { ANY } from "@/lib/auth/roles";
import { overviewFor } from "@/lib/overview/overview";

export const GET = withAuth({ roles: ANY }, async (_req, { who }) => Response.json({ data: (await overviewFor(who)).allocations }));

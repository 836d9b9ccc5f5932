// GET /api/v1/allocations – allocations in the caller's scope with balances derived from the ledger
// POST /api/v1/allocations – grant a new allocation to a group for a period (coordinators, admins)
import { withAuth } from "@/lib/auth/guard";
import { ANY, COORDINATORS } from "@/lib/auth/roles";
import { readJson } from "@/lib/http/read-json";
import { overviewFor } from "@/lib/overview/overview";
import { grantSchema, type GrantInput } from "@/lib/allocations/allocation-input";
import { grantAllocation } from "@/lib/allocations/manage-allocations";

export const GET = withAuth({ roles: ANY }, async (_req, { who }) => Response.json({ data: (await overviewFor(who)).allocations }));

export const POST = withAuth({ roles: COORDINATORS }, async (req, { audit }) =>
  Response.json({ data: await grantAllocation(audit, await readJson<GrantInput>(req, grantSchema)) }, { status: 201 }));

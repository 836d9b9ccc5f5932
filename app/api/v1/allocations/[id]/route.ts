// GET /api/v1/allocations/:id – balance, state, caps, burn rate and chart, usage by person and ensemble (own rows only for researchers and viewers)
import { withAuth } from "@/lib/auth/guard";
import { ANY } from "@/lib/auth/roles";
import { allocationTarget } from "@/lib/allocations/allocation-target";
import { allocationUsage } from "@/lib/allocations/usage";

export const dynamic = "force-dynamic";

export const GET = withAuth<{ id: string }>({ roles: ANY, target: (p) => allocationTarget(p.id), access: "read" }, async (_req, { who, params }) =>
  Response.json({ data: await allocationUsage(who, params.id) }));

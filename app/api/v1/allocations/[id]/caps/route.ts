// POST /api/v1/allocations/:id/caps – set or lift a cap: one person's, everyone's, or the per-ensemble ceiling (coordinators, admins)
import { withAuth } from "@/lib/auth/guard";
import { COORDINATORS } from "@/lib/auth/roles";
import { readJson } from "@/lib/http/read-json";
import { allocationTarget } from "@/lib/allocations/allocation-target";
import { capSchema, type CapInput } from "@/lib/allocations/allocation-input";
import { setCap } from "@/lib/allocations/manage-allocations";

export const POST = withAuth<{ id: string }>({ roles: COORDINATORS, target: (p) => allocationTarget(p.id), access: "act" }, async (req, { audit, params }) =>
  Response.json({ data: await setCap(audit, params.id, await readJson<CapInput>(req, capSchema)) }, { status: 201 }));

// POST /api/v1/allocations/:id/state – suspend, resume or close an allocation with a reason (coordinators, admins)
import { withAuth } from "@/lib/auth/guard";
import { COORDINATORS } from "@/lib/auth/roles";
import { readJson } from "@/lib/http/read-json";
import { allocationTarget } from "@/lib/allocations/allocation-target";
import { stateChangeSchema, type StateChangeInput } from "@/lib/allocations/allocation-input";
import { setAllocationState } from "@/lib/allocations/manage-allocations";

export const POST = withAuth<{ id: string }>({ roles: COORDINATORS, target: (p) => allocationTarget(p.id), access: "act" }, async (req, { audit, params }) =>
  Response.json({ data: await setAllocationState(audit, params.id, await readJson<StateChangeInput>(req, stateChangeSchema)) }));

// POST /api/v1/allocations/:id/ledger – top up (kind "top-up") or adjust with a reason (kind "adjust"); one ledger entry (coordinators, admins)
import { withAuth } from "@/lib/auth/guard";
import { COORDINATORS } from "@/lib/auth/roles";
import { readJson } from "@/lib/http/read-json";
import { allocationTarget } from "@/lib/allocations/allocation-target";
import { balanceChangeSchema, type BalanceChangeInput } from "@/lib/allocations/allocation-input";
import { changeBalance } from "@/lib/allocations/manage-allocations";

export const POST = withAuth<{ id: string }>({ roles: COORDINATORS, target: (p) => allocationTarget(p.id), access: "act" }, async (req, { audit, params }) =>
  Response.json({ data: await changeBalance(audit, params.id, await readJson<BalanceChangeInput>(req, balanceChangeSchema)) }, { status: 201 }));

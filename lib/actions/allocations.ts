// Server-action definitions of the Allocations pages (coordinators and admins change; see lib/allocations/manage-allocations.ts).
import { defineAction } from "../auth/action";
import { COORDINATORS } from "../auth/roles";
import {
  balanceChangeSchema, capSchema, grantSchema, stateChangeSchema, withId,
  type BalanceChangeInput, type CapInput, type GrantInput, type StateChangeInput,
} from "../allocations/allocation-input";
import { allocationTarget } from "../allocations/allocation-target";
import { changeBalance, grantAllocation, setAllocationState, setCap } from "../allocations/manage-allocations";

const onAllocation = { roles: COORDINATORS, target: (i: { id: string }) => allocationTarget(i.id), access: "act" as const };

export const grantAllocationAction = defineAction({
  name: "allocations.grant", schema: grantSchema, policy: { roles: COORDINATORS },
  run: (i: GrantInput, { audit }) => grantAllocation(audit, i),
});

export const changeBalanceAction = defineAction({
  name: "allocations.changeBalance", schema: withId(balanceChangeSchema), policy: onAllocation,
  run: (i: { id: string; change: BalanceChangeInput }, { audit }) => changeBalance(audit, i.id, i.change),
});

export const setAllocationStateAction = defineAction({
  name: "allocations.setState", schema: withId(stateChangeSchema), policy: onAllocation,
  run: (i: { id: string; change: StateChangeInput }, { audit }) => setAllocationState(audit, i.id, i.change),
});

export const setCapAction = defineAction({
  name: "allocations.setCap", schema: withId(capSchema), policy: onAllocation,
  run: (i: { id: string; change: CapInput }, { audit }) => setCap(audit, i.id, i.change),
});

import type { Identity } from "./identity";
import { crossGroup } from "./roles";

/** The groups whose data a person may read; null means every group (coordinator, admin). */
export function visibleGroupIds(who: Identity): string[] | null {
  return crossGroup(who.role) ? null : who.groupIds;
}

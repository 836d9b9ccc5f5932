"use server";
import { revalidatePath } from "next/cache";
import { runAction } from "@/lib/auth/run-action";
import { grantAllocationAction } from "@/lib/actions/allocations";
import type { GrantInput } from "@/lib/allocations/allocation-input";

export async function grantAllocation(input: GrantInput) {
  const result = await runAction(grantAllocationAction, input);
  revalidatePath("/allocations");
  return result;
}

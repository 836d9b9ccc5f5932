"use server";
import { revalidatePath } from "next/cache";
import { runAction } from "@/lib/auth/run-action";
import { setAllocationStateAction } from "@/lib/actions/allocations";

export async function setAllocationState(input: Parameters<typeof setAllocationStateAction.run>[0]) {
  const result = await runAction(setAllocationStateAction, input);
  revalidatePath(`/allocations/${input.id}`);
  revalidatePath("/allocations");
  return result;
}

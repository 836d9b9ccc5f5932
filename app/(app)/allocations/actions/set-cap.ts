"use server";
import { revalidatePath } from "next/cache";
import { runAction } from "@/lib/auth/run-action";
import { setCapAction } from "@/lib/actions/allocations";

export async function setCap(input: Parameters<typeof setCapAction.run>[0]) {
  const result = await runAction(setCapAction, input);
  revalidatePath(`/allocations/${input.id}`);
  revalidatePath("/allocations");
  return result;
}

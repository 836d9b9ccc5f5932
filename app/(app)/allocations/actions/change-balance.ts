"use server";
import { revalidatePath } from "next/cache";
import { runAction } from "@/lib/auth/run-action";
import { changeBalanceAction } from "@/lib/actions/allocations";

export async function changeBalance(input: Parameters<typeof changeBalanceAction.run>[0]) {
  const result = await runAction(changeBalanceAction, input);
  revalidatePath(`/allocations/${input.id}`);
  revalidatePath("/allocations");
  return result;
}

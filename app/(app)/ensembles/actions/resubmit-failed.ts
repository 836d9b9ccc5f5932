"use server";
import { revalidatePath } from "next/cache";
import { runAction } from "@/lib/auth/run-action";
import { resubmitFailedAction } from "@/lib/actions/ensembles";

export async function resubmitFailed(input: { id: string }) {
  const result = await runAction(resubmitFailedAction, input);
  revalidatePath(`/ensembles/${input.id}`);
  return result;
}

"use server";
import { revalidatePath } from "next/cache";
import { runAction } from "@/lib/auth/run-action";
import { cancelEnsembleAction } from "@/lib/actions/ensembles";

export async function cancelEnsemble(input: { id: string }) {
  const result = await runAction(cancelEnsembleAction, input);
  revalidatePath(`/ensembles/${input.id}`);
  return result;
}

"use server";
import { revalidatePath } from "next/cache";
import { runAction } from "@/lib/auth/run-action";
import { submitEnsembleAction } from "@/lib/actions/ensembles";

export async function submitEnsemble(input: { spec: unknown }) {
  const result = await runAction(submitEnsembleAction, input);
  if ("data" in result) revalidatePath("/ensembles");
  return result;
}

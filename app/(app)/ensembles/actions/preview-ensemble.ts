"use server";
import { runAction } from "@/lib/auth/run-action";
import { previewEnsembleAction } from "@/lib/actions/ensembles";

export async function previewEnsemble(input: { spec: unknown }) {
  return runAction(previewEnsembleAction, input);
}

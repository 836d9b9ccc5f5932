"use server";
import { revalidatePath } from "next/cache";
import { runAction } from "@/lib/auth/run-action";
import { addCollaboratorAction } from "@/lib/actions/manuscripts";

export async function addCollaborator(input: { id: string; userId: string }) {
  const result = await runAction(addCollaboratorAction, input);
  revalidatePath("/manuscripts");
  return result;
}

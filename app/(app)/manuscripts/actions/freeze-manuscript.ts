"use server";
import { revalidatePath } from "next/cache";
import { runAction } from "@/lib/auth/run-action";
import { freezeManuscriptAction } from "@/lib/actions/manuscripts";

export async function freezeManuscript(input: { id: string }) {
  const result = await runAction(freezeManuscriptAction, input);
  revalidatePath("/manuscripts");
  return result;
}

"use server";
import { revalidatePath } from "next/cache";
import { runAction } from "@/lib/auth/run-action";
import { unfreezeManuscriptAction } from "@/lib/actions/manuscripts";

export async function unfreezeManuscript(input: { id: string; reason: string }) {
  const result = await runAction(unfreezeManuscriptAction, input);
  revalidatePath("/manuscripts");
  return result;
}

"use server";
import { revalidatePath } from "next/cache";
import { runAction } from "@/lib/auth/run-action";
import { createManuscriptAction } from "@/lib/actions/manuscripts";

export async function createManuscript(input: { groupId: string; title: string; journal?: string | null }) {
  const result = await runAction(createManuscriptAction, input);
  revalidatePath("/manuscripts");
  return result;
}

"use server";
import { revalidatePath } from "next/cache";
import { runAction } from "@/lib/auth/run-action";
import { updatePersonAction } from "@/lib/actions/people";

export async function updatePerson(input: { id: string; change: { role?: string; active?: boolean; name?: string } }) {
  const result = await runAction(updatePersonAction, input);
  revalidatePath("/people");
  return result;
}

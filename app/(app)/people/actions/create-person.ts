"use server";
import { revalidatePath } from "next/cache";
import { runAction } from "@/lib/auth/run-action";
import { createPersonAction } from "@/lib/actions/people";

export async function createPerson(input: { email: string; name: string; role: string; password: string; groupIds?: string[] }) {
  const result = await runAction(createPersonAction, input);
  revalidatePath("/people");
  return result;
}

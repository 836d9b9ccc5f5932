"use server";
import { revalidatePath } from "next/cache";
import { runAction } from "@/lib/auth/run-action";
import { verifyManuscriptAction } from "@/lib/actions/manuscripts";

export async function verifyManuscript(input: { id: string }) {
  const result = await runAction(verifyManuscriptAction, input);
  revalidatePath("/manuscripts");
  return result;
}

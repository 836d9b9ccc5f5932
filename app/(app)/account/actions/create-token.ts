"use server";
import { revalidatePath } from "next/cache";
import { runAction } from "@/lib/auth/run-action";
import { createTokenAction } from "@/lib/actions/account";

export async function createToken(input: { name: string; expiresInDays?: number | null }) {
  const result = await runAction(createTokenAction, input);
  revalidatePath("/account");
  return result;
}

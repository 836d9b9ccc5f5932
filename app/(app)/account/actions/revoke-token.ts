"use server";
import { revalidatePath } from "next/cache";
import { runAction } from "@/lib/auth/run-action";
import { revokeTokenAction } from "@/lib/actions/account";

export async function revokeToken(input: { id: string }) {
  const result = await runAction(revokeTokenAction, input);
  revalidatePath("/account");
  return result;
}

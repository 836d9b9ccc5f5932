"use server";
import { runAction } from "@/lib/auth/run-action";
import { changePasswordAction } from "@/lib/actions/account";

export async function changePassword(input: { current: string; next: string }) {
  return runAction(changePasswordAction, input);
}

"use server";
import { revalidatePath } from "next/cache";
import { runAction } from "@/lib/auth/run-action";
import { setMembershipAction } from "@/lib/actions/people";

export async function setMembership(input: { userId: string; groupId: string; member: boolean; isLead?: boolean }) {
  const result = await runAction(setMembershipAction, input);
  revalidatePath("/people");
  return result;
}

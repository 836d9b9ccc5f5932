"use server";
import { revalidatePath } from "next/cache";
import { runAction } from "@/lib/auth/run-action";
import { checkClusterAction } from "@/lib/actions/clusters";

export async function checkCluster(input: { id: string }) {
  const result = await runAction(checkClusterAction, input);
  revalidatePath("/clusters");
  return result;
}

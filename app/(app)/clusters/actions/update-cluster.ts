"use server";
import { revalidatePath } from "next/cache";
import { runAction } from "@/lib/auth/run-action";
import { updateClusterAction } from "@/lib/actions/clusters";
import type { ClusterChange } from "@/lib/clusters/cluster-input";

export async function updateCluster(input: { id: string; change: ClusterChange }) {
  const result = await runAction(updateClusterAction, input);
  revalidatePath("/clusters");
  return result;
}

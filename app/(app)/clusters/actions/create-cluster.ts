"use server";
import { revalidatePath } from "next/cache";
import { runAction } from "@/lib/auth/run-action";
import { createClusterAction } from "@/lib/actions/clusters";
import type { ClusterInput } from "@/lib/clusters/cluster-input";

export async function createCluster(input: ClusterInput) {
  const result = await runAction(createClusterAction, input);
  revalidatePath("/clusters");
  return result;
}

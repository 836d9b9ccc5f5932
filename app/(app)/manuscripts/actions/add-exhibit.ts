"use server";
import { revalidatePath } from "next/cache";
import { runAction } from "@/lib/auth/run-action";
import { addExhibitAction } from "@/lib/actions/manuscripts";

export async function addExhibit(input: { id: string; exhibit: { label: string; caption?: string | null; kind: "figure" | "table"; viewId?: string; query?: Record<string, unknown> } }) {
  const result = await runAction(addExhibitAction, input);
  revalidatePath("/manuscripts");
  return result;
}

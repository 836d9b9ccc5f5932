"use server";
import { runAction } from "@/lib/auth/run-action";
import { fetchHostKeyAction } from "@/lib/actions/clusters";

/** Shows what the server presents; the coordinator compares it and types it in (never auto-trusted). */
export async function fetchHostKey(input: { host: string; port: number }) {
  return runAction(fetchHostKeyAction, input);
}

import "server-only";
import { headers } from "next/headers";
import { identify } from "./guard";
import { invokeAction, type ActionDef, type ActionResult } from "./action";
import { AppError } from "../errors";

/** Entry for "use server" files: resolve the session, then invokeAction. */
export async function runAction<I, O>(def: ActionDef<I, O>, raw: unknown): Promise<ActionResult<O>> {
  const h = await headers();
  const ip = h.get("x-forwarded-for")?.split(",")[0].trim() ?? null;
  let who = null;
  try { who = await identify(null); } catch (err) { if (!(err instanceof AppError)) throw err; }
  return invokeAction(def, who, raw, ip);
}

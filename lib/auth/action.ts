import "server-only";
import crypto from "node:crypto";
import { AppError, errorBody, type FieldIssue } from "../errors";
import { log } from "../log";
import { validate } from "../validation";
import { authorize, type Policy } from "./guard";
import type { Identity } from "./identity";
import type { AuditSource } from "../audit/record-audit";

/** What a server action returns to the UI: never a thrown error. */
export type ActionResult<T> = { data: T } | { error: { code: string; message: string; issues?: FieldIssue[] } };

export type ActionCtx = { who: Identity; audit: AuditSource };

/** A server action's definition: input schema, policy, and the lib/ call it makes. */
export type ActionDef<I, O> = {
  name: string;
  schema: object;
  policy: Policy<I>;
  run: (input: I, ctx: ActionCtx) => Promise<O>;
};

export function defineAction<I, O>(def: ActionDef<I, O>): ActionDef<I, O> {
  return def;
}

/** validate → guard → lib call, mapping every failure to { error }. `who` comes from the session. */
export async function invokeAction<I, O>(def: ActionDef<I, O>, who: Identity | null, raw: unknown, ip: string | null = null): Promise<ActionResult<O>> {
  const requestId = crypto.randomUUID();
  try {
    if (!who) throw new AppError("unauthenticated", "sign in first");
    const input = validate<I>(def.schema, raw, "form");
    await authorize(who, def.policy, input);
    const data = await def.run(input, { who, audit: { actorId: who.userId, ip, requestId } });
    return { data };
  } catch (err) {
    if (!(err instanceof AppError)) log.error({ err, action: def.name, requestId }, "server action failed");
    const e = err instanceof AppError ? err : new AppError("internal", "something went wrong; try again or tell an admin");
    return errorBody(e);
  }
}

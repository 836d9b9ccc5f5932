import "server-only";
import crypto from "node:crypto";
import { getServerSession } from "next-auth";
import { AppError, errorBody } from "../errors";
import { log } from "../log";
import { authOptions } from "./options";
import { loadIdentity, type Identity } from "./identity";
import { resolveApiToken } from "./tokens";
import { checkScope, type Target } from "./scope";
import type { Role } from "./roles";
import type { AuditSource } from "../audit/record-audit";

/** What every guarded handler receives: the caller, the request's audit source and route params. */
export type Ctx<P = Record<string, string>> = { who: Identity; audit: AuditSource; requestId: string; params: P; log: typeof log };

/** Who may call (roles) and, optionally, which target's group scope applies (read or act). */
export type Policy<P> = {
  roles: readonly Role[];
  target?: (params: P, who: Identity) => Promise<Target | null>;
  access?: "read" | "act";
};

/** Session cookie or Bearer token → Identity, or an AppError("unauthenticated"). */
export async function identify(req: Request | null): Promise<Identity> {
  const auth = req?.headers.get("authorization");
  if (auth) {
    const m = /^Bearer\s+(\S+)$/i.exec(auth);
    if (!m) throw new AppError("unauthenticated", "the Authorization header must be 'Bearer <token>'");
    const { userId, tokenId } = await resolveApiToken(m[1]);
    const who = await loadIdentity(userId, "token", tokenId);
    if (!who) throw new AppError("unauthenticated", "the token's owner is deactivated");
    return who;
  }
  const session = (await getServerSession(authOptions)) as { uid?: string } | null;
  if (!session?.uid) throw new AppError("unauthenticated", "sign in or send an API token");
  const who = await loadIdentity(session.uid, "session");
  if (!who) throw new AppError("unauthenticated", "your account is deactivated");
  return who;
}

/** Role, then group scope; a missing target is 404. Shared by route handlers and server actions. */
export async function authorize<P>(who: Identity, policy: Policy<P>, params: P): Promise<void> {
  if (!policy.roles.includes(who.role)) throw new AppError("forbidden", `this needs one of the roles: ${policy.roles.join(", ")}`);
  if (policy.target) {
    const target = await policy.target(params, who);
    if (!target) throw new AppError("not_found", "not found");
    checkScope(who, target, policy.access ?? "read");
  }
}

export function clientIpOf(req: Request | null): string | null {
  return req?.headers.get("x-forwarded-for")?.split(",")[0].trim() || null;
}

/** Map any thrown value to a JSON error response; unexpected errors are logged, not shown. */
export function errorResponse(err: unknown, requestId: string): Response {
  const e = err instanceof AppError ? err : new AppError("internal", "internal error; the request id identifies it in the logs");
  if (!(err instanceof AppError)) log.error({ err, requestId }, "unhandled error");
  return Response.json(errorBody(e), { status: e.status, headers: { "x-request-id": requestId } });
}

type RouteArgs<P> = { params: Promise<P> };

/** The one wrapper of every /api/v1 route handler: identity, role, scope, errors, request id. */
export function withAuth<P = Record<string, string>>(policy: Policy<P>, handler: (req: Request, ctx: Ctx<P>) => Promise<Response>) {
  return async (req: Request, route?: RouteArgs<P>): Promise<Response> => {
    const requestId = req.headers.get("x-request-id") ?? crypto.randomUUID();
    const reqLog = log.child({ requestId, method: req.method, path: new URL(req.url).pathname });
    try {
      const params = (route ? await route.params : {}) as P;
      const who = await identify(req);
      await authorize(who, policy, params);
      const res = await handler(req, { who, params, requestId, log: reqLog, audit: { actorId: who.userId, ip: clientIpOf(req), requestId } });
      res.headers.set("x-request-id", requestId);
      reqLog.info({ status: res.status, user: who.userId }, "request");
      return res;
    } catch (err) {
      const res = errorResponse(err, requestId);
      reqLog.info({ status: res.status }, "request refused");
      return res;
    }
  };
}

// HTTP helpers against the running test stack (npm test starts it): real sign-in, real cookies.
import { env } from "@/lib/env";

export const base = env.appUrl;

function cookiesOf(res: Response): string[] {
  return res.headers.getSetCookie().map((c) => c.split(";")[0]);
}

/** Sign in through next-auth's credentials endpoint; returns the session cookie header, or null if refused. */
export async function signIn(email: string, password: string): Promise<string | null> {
  const csrfRes = await fetch(`${base}/api/auth/csrf`);
  const { csrfToken } = (await csrfRes.json()) as { csrfToken: string };
  const jar = cookiesOf(csrfRes);
  const res = await fetch(`${base}/api/auth/callback/credentials`, {
    method: "POST",
    redirect: "manual",
    headers: { "content-type": "application/x-www-form-urlencoded", cookie: jar.join("; ") },
    body: new URLSearchParams({ csrfToken, email, password, json: "true" }),
  });
  const session = cookiesOf(res).find((c) => c.startsWith("next-auth.session-token="));
  return session ? [...jar, session].join("; ") : null;
}

export type Caller = { cookie?: string; token?: string };

/** Call an API route as a caller; body objects are sent as JSON, strings as they are. */
export async function api(method: string, path: string, caller: Caller = {}, body?: unknown, headers: Record<string, string> = {}) {
  const h: Record<string, string> = { ...headers };
  if (caller.cookie) h.cookie = caller.cookie;
  if (caller.token) h.authorization = `Bearer ${caller.token}`;
  if (body !== undefined && !h["content-type"]) h["content-type"] = "application/json";
  const res = await fetch(`${base}${path}`, { method, headers: h, body: body === undefined ? undefined : typeof body === "string" ? body : JSON.stringify(body), redirect: "manual" });
  const text = await res.text();
  let json: unknown = null;
  try { json = JSON.parse(text); } catch { /* not JSON */ }
  return { status: res.status, json: json as { data?: any; error?: { code: string; message: string; issues?: { path: string; message: string }[] } } | null, text };
}

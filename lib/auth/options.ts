import "server-only";
import type { NextAuthOptions } from "next-auth";
import Credentials from "next-auth/providers/credentials";
import { env } from "../env";
import { verifyCredentials } from "./sign-in";
import { recordAudit } from "../audit/record-audit";

function clientIp(headers: Record<string, unknown> | undefined): string {
  const fwd = headers?.["x-forwarded-for"];
  const first = (Array.isArray(fwd) ? fwd[0] : String(fwd ?? "")).split(",")[0].trim();
  return first || "unknown";
}

/** next-auth configuration: e-mail + password, JWT sessions carrying only the person's id. */
export const authOptions: NextAuthOptions = {
  secret: env.authSecret,
  session: { strategy: "jwt", maxAge: 12 * 3600 },
  pages: { signIn: "/sign-in" },
  providers: [
    Credentials({
      name: "E-mail and password",
      credentials: { email: { label: "E-mail", type: "email" }, password: { label: "Password", type: "password" } },
      async authorize(credentials, req) {
        const email = String(credentials?.email ?? "");
        const password = String(credentials?.password ?? "");
        if (!email || !password) throw new Error("wrong e-mail or password");
        const ip = clientIp(req?.headers as Record<string, unknown> | undefined);
        const result = await verifyCredentials(email, password, ip);
        if (!result.ok) throw new Error(result.reason === "rate_limited" ? "too many attempts; wait 15 minutes and try again" : "wrong e-mail or password");
        await recordAudit({ actorId: result.userId, ip, requestId: null }, "session.sign_in", { type: "user", id: result.userId });
        return { id: result.userId, email: email.toLowerCase() };
      },
    }),
  ],
  callbacks: {
    async jwt({ token, user }) {
      if (user) token.uid = user.id;
      return token;
    },
    async session({ session, token }) {
      (session as { uid?: string }).uid = token.uid as string | undefined;
      return session;
    },
  },
};

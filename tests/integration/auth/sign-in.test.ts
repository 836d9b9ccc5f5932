// Sign-in: the same refusal for a wrong password and an unknown account; rate limits per account.
import crypto from "node:crypto";
import { describe, expect, it } from "vitest";
import { db } from "@/models";
import { hashPassword } from "@/lib/auth/passwords";
import { verifyCredentials, MAX_FAILURES_PER_ACCOUNT } from "@/lib/auth/sign-in";
import { signIn } from "../../support/http";

describe("sign-in", () => {
  it("a wrong password and an unknown e-mail are refused alike; the right one signs in over HTTP", async () => {
    const email = `signin.${crypto.randomBytes(4).toString("hex")}@auth.example`;
    await db().User.create({ email, name: "Sign-in test", role: "viewer", passwordHash: await hashPassword("right-password-1") });
    expect(await verifyCredentials(email, "wrong-password", "10.0.0.1")).toEqual({ ok: false, reason: "wrong" });
    expect(await verifyCredentials("nobody@auth.example", "wrong-password", "10.0.0.1")).toEqual({ ok: false, reason: "wrong" });
    expect(await signIn(email, "wrong-password")).toBeNull();
    expect(await signIn(email, "right-password-1")).toMatch(/next-auth.session-token=/);
  });

  it(`after ${MAX_FAILURES_PER_ACCOUNT} failures an account is locked for the window, even with the right password`, async () => {
    const email = `lock.${crypto.randomBytes(4).toString("hex")}@auth.example`;
    await db().User.create({ email, name: "Lock test", role: "viewer", passwordHash: await hashPassword("right-password-1") });
    for (let i = 0; i < MAX_FAILURES_PER_ACCOUNT; i++) expect((await verifyCredentials(email, "nope", `10.1.0.${i}`)).ok).toBe(false);
    expect(await verifyCredentials(email, "right-password-1", "10.2.0.1")).toEqual({ ok: false, reason: "rate_limited" });
    // another account from the same addresses is unaffected
    const other = `other.${crypto.randomBytes(4).toString("hex")}@auth.example`;
    await db().User.create({ email: other, name: "Other", role: "viewer", passwordHash: await hashPassword("right-password-2") });
    expect((await verifyCredentials(other, "right-password-2", "10.1.0.1")).ok).toBe(true);
  });

  it("a deactivated person cannot sign in", async () => {
    const email = `off.${crypto.randomBytes(4).toString("hex")}@auth.example`;
    await db().User.create({ email, name: "Off", role: "viewer", active: false, passwordHash: await hashPassword("right-password-1") });
    expect(await verifyCredentials(email, "right-password-1", "10.3.0.1")).toEqual({ ok: false, reason: "wrong" });
  });
});

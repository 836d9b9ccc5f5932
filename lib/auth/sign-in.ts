import "server-only";
import bcrypt from "bcryptjs";
import { Op } from "sequelize";
import { db } from "@/models";

// Common practice limits (OWASP-style): a window of 15 minutes, 5 failures per account, 20 per address.
export const SIGN_IN_WINDOW_MS = 15 * 60_000;
export const MAX_FAILURES_PER_ACCOUNT = 5;
export const MAX_FAILURES_PER_ADDRESS = 20;

export type SignInResult = { ok: true; userId: string } | { ok: false; reason: "wrong" | "rate_limited" };

// A fixed hash to compare against when the account does not exist, so timing does not tell.
const DUMMY_HASH = bcrypt.hashSync("not-a-real-password", 10);

/** Check e-mail + password, counting attempts per account and per address. */
export async function verifyCredentials(emailRaw: string, password: string, ip: string): Promise<SignInResult> {
  const { User, SignInAttempt } = db();
  const email = emailRaw.trim().toLowerCase();
  const since = new Date(Date.now() - SIGN_IN_WINDOW_MS);
  const [byAccount, byAddress] = await Promise.all([
    SignInAttempt.count({ where: { email, succeeded: false, createdAt: { [Op.gte]: since } } }),
    SignInAttempt.count({ where: { ip, succeeded: false, createdAt: { [Op.gte]: since } } }),
  ]);
  if (byAccount >= MAX_FAILURES_PER_ACCOUNT || byAddress >= MAX_FAILURES_PER_ADDRESS) {
    await SignInAttempt.create({ email, ip, succeeded: false });
    return { ok: false, reason: "rate_limited" };
  }
  const user = await User.findOne({ where: { email } });
  const good = await bcrypt.compare(password, user?.passwordHash ?? DUMMY_HASH);
  const ok = Boolean(user && user.active && good);
  await SignInAttempt.create({ email, ip, succeeded: ok });
  if (!ok || !user) return { ok: false, reason: "wrong" };
  await user.update({ lastSignInAt: new Date() });
  return { ok: true, userId: user.id };
}

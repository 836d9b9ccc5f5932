import "server-only";
import { db } from "@/models";
import { AppError } from "../errors";
import { checkPassword, hashPassword } from "../auth/passwords";
import { recordAudit, type AuditSource } from "../audit/record-audit";

export const MIN_PASSWORD_LENGTH = 10;

/** Change one's own password after checking the current one. */
export async function changePassword(src: AuditSource, userId: string, current: string, next: string) {
  const { User, sequelize } = db();
  const user = await User.findByPk(userId);
  if (!user) throw new AppError("not_found", "person not found");
  if (!user.passwordHash || !(await checkPassword(current, user.passwordHash))) throw new AppError("invalid", "the current password is wrong", { issues: [{ path: "/current", message: "is wrong" }] });
  if (next.length < MIN_PASSWORD_LENGTH) throw new AppError("invalid", `the new password needs at least ${MIN_PASSWORD_LENGTH} characters`, { issues: [{ path: "/next", message: `needs at least ${MIN_PASSWORD_LENGTH} characters` }] });
  const passwordHash = await hashPassword(next);
  await sequelize.transaction(async (transaction) => {
    await user.update({ passwordHash }, { transaction });
    await recordAudit(src, "account.change_password", { type: "user", id: userId }, {}, transaction);
  });
  return { changed: true };
}

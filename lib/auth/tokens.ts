import "server-only";
import crypto from "node:crypto";
import { db } from "@/models";
import { AppError } from "../errors";
import { recordAudit, type AuditSource } from "../audit/record-audit";

const PREFIX = "edx_";
export const hashToken = (raw: string) => crypto.createHash("sha256").update(raw).digest("hex");

/** Create an API token; the raw value is returned once and only its hash is stored. */
export async function createApiToken(src: AuditSource, userId: string, name: string, expiresInDays: number | null) {
  const raw = PREFIX + crypto.randomBytes(24).toString("base64url");
  const expiresAt = expiresInDays ? new Date(Date.now() + expiresInDays * 86_400_000) : null;
  const { ApiToken, sequelize } = db();
  const row = await sequelize.transaction(async (transaction) => {
    const t = await ApiToken.create({ userId, name, tokenHash: hashToken(raw), prefix: raw.slice(0, 12), expiresAt }, { transaction });
    await recordAudit(src, "token.create", { type: "api_token", id: t.id }, { name, expiresAt }, transaction);
    return t;
  });
  return { token: raw, id: row.id, name: row.name, prefix: row.prefix, expiresAt };
}

/** Resolve a Bearer token to its owner; expired or revoked tokens are refused with a reason. */
export async function resolveApiToken(raw: string): Promise<{ userId: string; tokenId: string }> {
  if (!raw.startsWith(PREFIX)) throw new AppError("unauthenticated", "the API token is malformed");
  const row = await db().ApiToken.findOne({ where: { tokenHash: hashToken(raw) } });
  if (!row) throw new AppError("unauthenticated", "the API token is not known");
  if (row.revokedAt) throw new AppError("unauthenticated", "the API token was revoked");
  if (row.expiresAt && row.expiresAt.getTime() <= Date.now()) throw new AppError("unauthenticated", "the API token has expired");
  // lastUsedAt is advisory: at most one write a minute per token.
  if (!row.lastUsedAt || Date.now() - row.lastUsedAt.getTime() > 60_000) await row.update({ lastUsedAt: new Date() });
  return { userId: row.userId, tokenId: row.id };
}

/** The caller's own tokens (never the secret). */
export async function listApiTokens(userId: string) {
  const rows = await db().ApiToken.findAll({ where: { userId }, order: [["createdAt", "DESC"]] });
  return rows.map((t) => ({ id: t.id, name: t.name, prefix: t.prefix, createdAt: t.createdAt, expiresAt: t.expiresAt, revokedAt: t.revokedAt, lastUsedAt: t.lastUsedAt }));
}

/** Revoke one of the caller's tokens; someone else's token is "not found". */
export async function revokeApiToken(src: AuditSource, userId: string, tokenId: string) {
  const { ApiToken, sequelize } = db();
  const row = await ApiToken.findOne({ where: { id: tokenId, userId } });
  if (!row) throw new AppError("not_found", "token not found");
  if (!row.revokedAt) {
    await sequelize.transaction(async (transaction) => {
      await row.update({ revokedAt: new Date() }, { transaction });
      await recordAudit(src, "token.revoke", { type: "api_token", id: row.id }, {}, transaction);
    });
  }
  return { id: row.id, revokedAt: row.revokedAt };
}

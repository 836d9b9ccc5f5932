import type { Transaction } from "sequelize";
import { db } from "@/models";

/** Where a mutating call came from: who, from which address, which request. */
export type AuditSource = { actorId: string | null; ip: string | null; requestId: string | null };

/** Append an audit entry (who, what, target, when, from where); part of the caller's transaction. */
export async function recordAudit(
  src: AuditSource,
  action: string,
  target: { type: string; id?: string | null; groupId?: string | null },
  detail: Record<string, unknown> = {},
  transaction?: Transaction,
) {
  await db().AuditEntry.create(
    { actorId: src.actorId, action, targetType: target.type, targetId: target.id ?? null, groupId: target.groupId ?? null, detail, ip: src.ip, requestId: src.requestId },
    { transaction },
  );
}

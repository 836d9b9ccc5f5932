// Who did what to which object, when and from where. Append-only: a trigger refuses UPDATE and DELETE.
import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type NonAttribute, type Sequelize } from "sequelize";
import { bigintPk } from "./columns";
import type { User } from "./user";

export class AuditEntry extends Model<InferAttributes<AuditEntry>, InferCreationAttributes<AuditEntry>> {
  /** bigint identity, as a string. */
  declare id: CreationOptional<string>;
  declare actorId: string | null;
  /** Dotted verb, e.g. "ensemble.submit", "manuscript.freeze". */
  declare action: string;
  declare targetType: string;
  declare targetId: string | null;
  declare groupId: CreationOptional<string | null>;
  declare detail: CreationOptional<Record<string, unknown>>;
  declare ip: CreationOptional<string | null>;
  declare requestId: CreationOptional<string | null>;
  declare createdAt: CreationOptional<Date>;

  declare actor?: NonAttribute<User | null>;
}
export type AuditEntryAttributes = InferAttributes<AuditEntry>;
export type AuditEntryCreationAttributes = InferCreationAttributes<AuditEntry>;

/** Define AuditEntry on `sequelize`. */
export function initAuditEntry(sequelize: Sequelize, M: typeof AuditEntry = AuditEntry): typeof AuditEntry {
  M.init(
    {
      id: bigintPk(),
      actorId: { type: DataTypes.UUID, allowNull: true },
      action: { type: DataTypes.TEXT, allowNull: false },
      targetType: { type: DataTypes.TEXT, allowNull: false },
      targetId: { type: DataTypes.TEXT, allowNull: true },
      groupId: { type: DataTypes.UUID, allowNull: true },
      detail: { type: DataTypes.JSONB, allowNull: false, defaultValue: {} },
      ip: { type: DataTypes.TEXT, allowNull: true },
      requestId: { type: DataTypes.TEXT, allowNull: true },
      createdAt: { type: DataTypes.DATE },
    },
    { sequelize, modelName: "AuditEntry", tableName: "audit_entries", underscored: true, timestamps: true, updatedAt: false },
  );
  return M;
}

// An e-mail written first to the database, then sent by a queue job, so none is lost.
import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from "sequelize";
import { bigintPk, common, TIMESTAMPS } from "./columns";

export const OUTBOX_STATES = ["pending", "sent", "failed"] as const;
export type OutboxState = (typeof OUTBOX_STATES)[number];

export class OutboxMessage extends Model<InferAttributes<OutboxMessage>, InferCreationAttributes<OutboxMessage>> {
  /** bigint identity, as a string. */
  declare id: CreationOptional<string>;
  /** Recipient addresses; at least one. */
  declare to: string[];
  declare subject: string;
  declare textBody: string;
  declare htmlBody: CreationOptional<string | null>;
  /** What the message is about, e.g. "run.failed", "allocation.80". */
  declare kind: string;
  /** Unique when set: writing the same alert twice is refused. */
  declare dedupeKey: CreationOptional<string | null>;
  declare state: CreationOptional<OutboxState>;
  declare attempts: CreationOptional<number>;
  declare lastError: CreationOptional<string | null>;
  /** Set exactly when state is 'sent'. */
  declare sentAt: CreationOptional<Date | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}
export type OutboxMessageAttributes = InferAttributes<OutboxMessage>;
export type OutboxMessageCreationAttributes = InferCreationAttributes<OutboxMessage>;

/** Define OutboxMessage on `sequelize`. */
export function initOutboxMessage(sequelize: Sequelize, M: typeof OutboxMessage = OutboxMessage): typeof OutboxMessage {
  M.init(
    {
      id: bigintPk(),
      to: { type: DataTypes.ARRAY(DataTypes.TEXT), allowNull: false },
      subject: { type: DataTypes.TEXT, allowNull: false },
      textBody: { type: DataTypes.TEXT, allowNull: false },
      htmlBody: { type: DataTypes.TEXT, allowNull: true },
      kind: { type: DataTypes.TEXT, allowNull: false },
      dedupeKey: { type: DataTypes.TEXT, allowNull: true },
      state: { type: DataTypes.TEXT, allowNull: false, defaultValue: "pending" },
      attempts: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
      lastError: { type: DataTypes.TEXT, allowNull: true },
      sentAt: { type: DataTypes.DATE, allowNull: true },
      ...TIMESTAMPS,
    },
    { sequelize, modelName: "OutboxMessage", tableName: "outbox_messages", ...common },
  );
  return M;
}

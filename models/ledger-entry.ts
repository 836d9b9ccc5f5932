// One movement of core-hours on an allocation. Append-only (a trigger refuses UPDATE and DELETE):
// mistakes are corrected by an 'adjust' entry, never by editing history.
import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from "sequelize";
import { asNumber, bigintPk, CORE_HOURS } from "./columns";

/** Sign convention: lib/allocations/balance.ts. */
export const LEDGER_KINDS = ["reserve", "charge", "release", "grant", "adjust"] as const;
export type LedgerKind = (typeof LEDGER_KINDS)[number];

export class LedgerEntry extends Model<InferAttributes<LedgerEntry>, InferCreationAttributes<LedgerEntry>> {
  /** bigint identity, as a string. */
  declare id: CreationOptional<string>;
  declare allocationId: string;
  declare kind: LedgerKind;
  /** Non-negative except for 'adjust', which may go either way. */
  declare coreHours: number;
  declare ensembleId: CreationOptional<string | null>;
  declare runId: CreationOptional<string | null>;
  /** Whose use this is (for per-person caps), or who granted/adjusted. */
  declare userId: CreationOptional<string | null>;
  declare note: CreationOptional<string | null>;
  declare createdAt: CreationOptional<Date>;
}
export type LedgerEntryAttributes = InferAttributes<LedgerEntry>;
export type LedgerEntryCreationAttributes = InferCreationAttributes<LedgerEntry>;

/** Define LedgerEntry on `sequelize`. */
export function initLedgerEntry(sequelize: Sequelize, M: typeof LedgerEntry = LedgerEntry): typeof LedgerEntry {
  M.init(
    {
      id: bigintPk(),
      allocationId: { type: DataTypes.UUID, allowNull: false },
      kind: { type: DataTypes.TEXT, allowNull: false },
      coreHours: asNumber(CORE_HOURS, "coreHours", { allowNull: false }),
      ensembleId: { type: DataTypes.UUID, allowNull: true },
      runId: { type: DataTypes.UUID, allowNull: true },
      userId: { type: DataTypes.UUID, allowNull: true },
      note: { type: DataTypes.TEXT, allowNull: true },
      createdAt: { type: DataTypes.DATE },
    },
    { sequelize, modelName: "LedgerEntry", tableName: "ledger_entries", underscored: true, timestamps: true, updatedAt: false },
  );
  return M;
}

// Core-hours granted to a group for a period. The balance is not stored: see lib/allocations/balance.ts.
import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type NonAttribute, type Sequelize } from "sequelize";
import { asNumber, common, CORE_HOURS, TIMESTAMPS, uuidPk } from "./columns";
import type { Group } from "./group";
import type { LedgerEntry } from "./ledger-entry";

export class Allocation extends Model<InferAttributes<Allocation>, InferCreationAttributes<Allocation>> {
  declare id: CreationOptional<string>;
  declare groupId: string;
  declare name: string;
  declare periodStart: Date;
  /** Exclusive end of the period; a CHECK keeps it after periodStart. */
  declare periodEnd: Date;
  /** The cluster these hours are for; null = any cluster (#8). */
  declare clusterId: CreationOptional<string | null>;
  /** Most core-hours one person may charge in this allocation; null = no cap. The default cap when allocation_caps has no 'everyone' row (lib/allocations/caps.ts). */
  declare perPersonCapCoreHours: CreationOptional<number | null>;
  /** When the 80 % and 100 % use e-mails went out; cleared (re-armed) when use drops below again. */
  declare alertedAt80: CreationOptional<Date | null>;
  declare alertedAt100: CreationOptional<Date | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  declare group?: NonAttribute<Group>;
  declare entries?: NonAttribute<LedgerEntry[]>;
}
export type AllocationAttributes = InferAttributes<Allocation>;
export type AllocationCreationAttributes = InferCreationAttributes<Allocation>;

/** Define Allocation on `sequelize`. */
export function initAllocation(sequelize: Sequelize, M: typeof Allocation = Allocation): typeof Allocation {
  M.init(
    {
      id: uuidPk(),
      groupId: { type: DataTypes.UUID, allowNull: false },
      name: { type: DataTypes.TEXT, allowNull: false },
      periodStart: { type: DataTypes.DATE, allowNull: false },
      periodEnd: { type: DataTypes.DATE, allowNull: false },
      clusterId: { type: DataTypes.UUID, allowNull: true },
      perPersonCapCoreHours: asNumber(CORE_HOURS, "perPersonCapCoreHours", { allowNull: true }),
      // Explicit: the default underscoring would give "alerted_at80".
      alertedAt80: { type: DataTypes.DATE, allowNull: true, field: "alerted_at_80" },
      alertedAt100: { type: DataTypes.DATE, allowNull: true, field: "alerted_at_100" },
      ...TIMESTAMPS,
    },
    { sequelize, modelName: "Allocation", tableName: "allocations", ...common },
  );
  return M;
}

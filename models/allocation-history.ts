// The append-only rows of an allocation's lifecycle (#8): state changes, caps and near-cap notice
// marks. lib/allocations/ reads them with DISTINCT ON queries (newest row wins); these models give
// the tables their place in the model set (schema checks, typed access where convenient).
import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from "sequelize";
import { asNumber, bigintPk, CORE_HOURS } from "./columns";

/** One change of an allocation's state (append-only; the newest is the state). */
export class AllocationStateChange extends Model<InferAttributes<AllocationStateChange>, InferCreationAttributes<AllocationStateChange>> {
  declare id: CreationOptional<string>;
  declare allocationId: string;
  declare state: "active" | "suspended" | "closed";
  declare reason: string;
  declare actorId: CreationOptional<string | null>;
  declare createdAt: CreationOptional<Date>;
}

/** Define AllocationStateChange on `sequelize`. */
export function initAllocationStateChange(sequelize: Sequelize, M: typeof AllocationStateChange = AllocationStateChange): typeof AllocationStateChange {
  M.init({
    id: bigintPk(),
    allocationId: { type: DataTypes.UUID, allowNull: false },
    state: { type: DataTypes.TEXT, allowNull: false },
    reason: { type: DataTypes.TEXT, allowNull: false },
    actorId: { type: DataTypes.UUID, allowNull: true },
    createdAt: { type: DataTypes.DATE },
  }, { sequelize, modelName: "AllocationStateChange", tableName: "allocation_state_changes", underscored: true, timestamps: true, updatedAt: false });
  return M;
}

/** One cap as set (append-only; the newest row per subject and person is in force). */
export class AllocationCap extends Model<InferAttributes<AllocationCap>, InferCreationAttributes<AllocationCap>> {
  declare id: CreationOptional<string>;
  declare allocationId: string;
  declare subject: "person" | "everyone" | "ensemble";
  declare userId: CreationOptional<string | null>;
  declare coreHours: CreationOptional<number | null>;
  declare share: CreationOptional<number | null>;
  declare reason: CreationOptional<string | null>;
  declare actorId: CreationOptional<string | null>;
  declare createdAt: CreationOptional<Date>;
}

/** Define AllocationCap on `sequelize`. */
export function initAllocationCap(sequelize: Sequelize, M: typeof AllocationCap = AllocationCap): typeof AllocationCap {
  M.init({
    id: bigintPk(),
    allocationId: { type: DataTypes.UUID, allowNull: false },
    subject: { type: DataTypes.TEXT, allowNull: false },
    userId: { type: DataTypes.UUID, allowNull: true },
    coreHours: asNumber(CORE_HOURS, "coreHours", { allowNull: true }),
    share: asNumber(DataTypes.DECIMAL(7, 6), "share", { allowNull: true }),
    reason: { type: DataTypes.TEXT, allowNull: true },
    actorId: { type: DataTypes.UUID, allowNull: true },
    createdAt: { type: DataTypes.DATE },
  }, { sequelize, modelName: "AllocationCap", tableName: "allocation_caps", underscored: true, timestamps: true, updatedAt: false });
  return M;
}

/** A person told they are near their cap on an allocation (removed when they drop below again). */
export class AllocationCapNotice extends Model<InferAttributes<AllocationCapNotice>, InferCreationAttributes<AllocationCapNotice>> {
  declare allocationId: string;
  declare userId: string;
  declare notifiedAt: CreationOptional<Date>;
}

/** Define AllocationCapNotice on `sequelize`. */
export function initAllocationCapNotice(sequelize: Sequelize, M: typeof AllocationCapNotice = AllocationCapNotice): typeof AllocationCapNotice {
  M.init({
    allocationId: { type: DataTypes.UUID, allowNull: false, primaryKey: true },
    userId: { type: DataTypes.UUID, allowNull: false, primaryKey: true },
    notifiedAt: { type: DataTypes.DATE, allowNull: false, defaultValue: DataTypes.NOW },
  }, { sequelize, modelName: "AllocationCapNotice", tableName: "allocation_cap_notices", underscored: true, timestamps: false });
  return M;
}

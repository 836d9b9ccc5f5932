// One attempt to bring a result bundle in, from a cluster or an upload; keyed by the bundle's hash.
import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from "sequelize";
import { uuidPk } from "./columns";
import type { RunSource } from "./run";

export const IMPORT_STATES = ["accepted", "rejected"] as const;
export type ImportState = (typeof IMPORT_STATES)[number];

export class Import extends Model<InferAttributes<Import>, InferCreationAttributes<Import>> {
  declare id: CreationOptional<string>;
  declare runId: CreationOptional<string | null>;
  declare source: RunSource;
  declare uploadedById: CreationOptional<string | null>;
  /** File names as uploaded (before archiving by hash). */
  declare originalNames: CreationOptional<string[]>;
  /** sha256 over the bundle; unique, so a second import of the same bundle is a no-op. */
  declare bundleHash: string;
  declare state: ImportState;
  /** Why a bundle was refused; set exactly when state is 'rejected'. */
  declare rejectReason: CreationOptional<string | null>;
  declare importerVersion: string;
  declare createdAt: CreationOptional<Date>;
}
export type ImportAttributes = InferAttributes<Import>;
export type ImportCreationAttributes = InferCreationAttributes<Import>;

/** Define Import on `sequelize`. */
export function initImport(sequelize: Sequelize, M: typeof Import = Import): typeof Import {
  M.init(
    {
      id: uuidPk(),
      runId: { type: DataTypes.UUID, allowNull: true },
      source: { type: DataTypes.TEXT, allowNull: false },
      uploadedById: { type: DataTypes.UUID, allowNull: true },
      originalNames: { type: DataTypes.JSONB, allowNull: false, defaultValue: [] },
      bundleHash: { type: DataTypes.CHAR(64), allowNull: false },
      state: { type: DataTypes.TEXT, allowNull: false },
      rejectReason: { type: DataTypes.TEXT, allowNull: true },
      importerVersion: { type: DataTypes.TEXT, allowNull: false },
      createdAt: { type: DataTypes.DATE },
    },
    { sequelize, modelName: "Import", tableName: "imports", underscored: true, timestamps: true, updatedAt: false },
  );
  return M;
}

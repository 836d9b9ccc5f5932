// A figure or table of a manuscript: the saved query behind it and, once frozen, its data snapshot.
import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from "sequelize";
import { common, TIMESTAMPS, uuidPk } from "./columns";

export const EXHIBIT_KINDS = ["figure", "table"] as const;
export type ExhibitKind = (typeof EXHIBIT_KINDS)[number];

export class Exhibit extends Model<InferAttributes<Exhibit>, InferCreationAttributes<Exhibit>> {
  declare id: CreationOptional<string>;
  declare manuscriptId: string;
  /** "Fig. 2", "Table 1"; unique within the manuscript. */
  declare label: string;
  declare caption: CreationOptional<string | null>;
  declare kind: ExhibitKind;
  /** The saved explorer query that produces the exhibit's data. */
  declare query: Record<string, unknown>;
  declare snapshot: CreationOptional<Record<string, unknown> | null>;
  /** sha256 of the canonical snapshot; set exactly when snapshot is. */
  declare snapshotHash: CreationOptional<string | null>;
  declare position: CreationOptional<number>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}
export type ExhibitAttributes = InferAttributes<Exhibit>;
export type ExhibitCreationAttributes = InferCreationAttributes<Exhibit>;

/** Define Exhibit on `sequelize`. */
export function initExhibit(sequelize: Sequelize, M: typeof Exhibit = Exhibit): typeof Exhibit {
  M.init(
    {
      id: uuidPk(),
      manuscriptId: { type: DataTypes.UUID, allowNull: false },
      label: { type: DataTypes.TEXT, allowNull: false },
      caption: { type: DataTypes.TEXT, allowNull: true },
      kind: { type: DataTypes.TEXT, allowNull: false },
      query: { type: DataTypes.JSONB, allowNull: false },
      snapshot: { type: DataTypes.JSONB, allowNull: true },
      snapshotHash: { type: DataTypes.CHAR(64), allowNull: true },
      position: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
      ...TIMESTAMPS,
    },
    { sequelize, modelName: "Exhibit", tableName: "exhibits", ...common },
  );
  return M;
}

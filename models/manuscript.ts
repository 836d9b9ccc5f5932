// A paper in preparation; freezing it snapshots the data behind every exhibit.
import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type NonAttribute, type Sequelize } from "sequelize";
import { common, TIMESTAMPS, uuidPk } from "./columns";
import type { Exhibit } from "./exhibit";

export const MANUSCRIPT_STATES = ["draft", "frozen"] as const;
export type ManuscriptState = (typeof MANUSCRIPT_STATES)[number];

export class Manuscript extends Model<InferAttributes<Manuscript>, InferCreationAttributes<Manuscript>> {
  declare id: CreationOptional<string>;
  declare groupId: string;
  declare title: string;
  declare journal: CreationOptional<string | null>;
  declare state: CreationOptional<ManuscriptState>;
  /** Set together with frozenById exactly when state is 'frozen'. */
  declare frozenAt: CreationOptional<Date | null>;
  declare frozenById: CreationOptional<string | null>;
  declare createdById: string;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  declare exhibits?: NonAttribute<Exhibit[]>;
}
export type ManuscriptAttributes = InferAttributes<Manuscript>;
export type ManuscriptCreationAttributes = InferCreationAttributes<Manuscript>;

/** Define Manuscript on `sequelize`. */
export function initManuscript(sequelize: Sequelize, M: typeof Manuscript = Manuscript): typeof Manuscript {
  M.init(
    {
      id: uuidPk(),
      groupId: { type: DataTypes.UUID, allowNull: false },
      title: { type: DataTypes.TEXT, allowNull: false },
      journal: { type: DataTypes.TEXT, allowNull: true },
      state: { type: DataTypes.TEXT, allowNull: false, defaultValue: "draft" },
      frozenAt: { type: DataTypes.DATE, allowNull: true },
      frozenById: { type: DataTypes.UUID, allowNull: true },
      createdById: { type: DataTypes.UUID, allowNull: false },
      ...TIMESTAMPS,
    },
    { sequelize, modelName: "Manuscript", tableName: "manuscripts", ...common },
  );
  return M;
}

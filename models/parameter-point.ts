// One point of an ensemble's parameter scan.
import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type NonAttribute, type Sequelize } from "sequelize";
import { uuidPk } from "./columns";
import type { Run } from "./run";

export class ParameterPoint extends Model<InferAttributes<ParameterPoint>, InferCreationAttributes<ParameterPoint>> {
  declare id: CreationOptional<string>;
  declare ensembleId: string;
  /** 0-based position in the expanded scan; enters the seed derivation. */
  declare pointIndex: number;
  /** The sampler parameters at this point, e.g. { L: 16, T: 2.3, algorithm: "wolff" }. */
  declare params: Record<string, unknown>;
  declare createdAt: CreationOptional<Date>;

  declare runs?: NonAttribute<Run[]>;
}
export type ParameterPointAttributes = InferAttributes<ParameterPoint>;
export type ParameterPointCreationAttributes = InferCreationAttributes<ParameterPoint>;

/** Define ParameterPoint on `sequelize`. */
export function initParameterPoint(sequelize: Sequelize, M: typeof ParameterPoint = ParameterPoint): typeof ParameterPoint {
  M.init(
    {
      id: uuidPk(),
      ensembleId: { type: DataTypes.UUID, allowNull: false },
      pointIndex: { type: DataTypes.INTEGER, allowNull: false },
      params: { type: DataTypes.JSONB, allowNull: false },
      createdAt: { type: DataTypes.DATE },
    },
    { sequelize, modelName: "ParameterPoint", tableName: "parameter_points", underscored: true, timestamps: true, updatedAt: false },
  );
  return M;
}

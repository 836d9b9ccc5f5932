// A chunk of one observable's measurement series of one run: consecutive float8 values from startRow.
import { DataTypes, Model, type InferAttributes, type InferCreationAttributes, type Sequelize } from "sequelize";

export class Series extends Model<InferAttributes<Series>, InferCreationAttributes<Series>> {
  declare runId: string;
  declare observable: string;
  /** 0-based chunk number; (runId, observable, chunkIndex) is the primary key. */
  declare chunkIndex: number;
  /** Row (measurement number, 0-based) of values[0] within the whole series. */
  declare startRow: number;
  declare values: number[];
}
export type SeriesAttributes = InferAttributes<Series>;
export type SeriesCreationAttributes = InferCreationAttributes<Series>;

/** Define Series on `sequelize`. */
export function initSeries(sequelize: Sequelize, M: typeof Series = Series): typeof Series {
  M.init(
    {
      runId: { type: DataTypes.UUID, allowNull: false, primaryKey: true },
      observable: { type: DataTypes.TEXT, allowNull: false, primaryKey: true },
      chunkIndex: { type: DataTypes.INTEGER, allowNull: false, primaryKey: true },
      startRow: { type: DataTypes.INTEGER, allowNull: false },
      values: { type: DataTypes.ARRAY(DataTypes.DOUBLE), allowNull: false },
    },
    { sequelize, modelName: "Series", tableName: "series", underscored: true, timestamps: false },
  );
  return M;
}

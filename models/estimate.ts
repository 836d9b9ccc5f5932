// An estimate of one observable, for a run or for a parameter point (combining its replicas).
import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from "sequelize";
import { uuidPk } from "./columns";

export const ESTIMATE_SCOPES = ["run", "point"] as const;
export type EstimateScope = (typeof ESTIMATE_SCOPES)[number];

export class Estimate extends Model<InferAttributes<Estimate>, InferCreationAttributes<Estimate>> {
  declare id: CreationOptional<string>;
  declare scope: EstimateScope;
  /** Set exactly when scope is 'run'. */
  declare runId: string | null;
  declare pointId: string;
  declare ensembleId: string;
  declare observable: string;
  declare mean: number;
  declare error: number;
  declare tauInt: CreationOptional<number | null>;
  declare tauIntError: CreationOptional<number | null>;
  /** Measurements discarded as thermalisation. */
  declare thermCut: CreationOptional<number>;
  /** Measurements used after the cut. */
  declare n: number;
  /** Summation window of tau_int, where a windowing method chose one. */
  declare window: CreationOptional<number | null>;
  declare method: string;
  declare analysisVersion: string;
  /** 1, 2, … per (run or point, observable); older versions are kept. */
  declare version: CreationOptional<number>;
  /** At most one current estimate per (run or point, observable), enforced by a partial unique index. */
  declare isCurrent: CreationOptional<boolean>;
  /** Who picked this version over the automatic one, if anyone. */
  declare chosenById: CreationOptional<string | null>;
  declare chosenAt: CreationOptional<Date | null>;
  /** Consistency of replicas for point estimates (chi²/dof). */
  declare chi2dof: CreationOptional<number | null>;
  declare flagged: CreationOptional<boolean>;
  /** Copy of the point's params, for filtering in the explorer without a join. */
  declare params: CreationOptional<Record<string, unknown>>;
  declare createdAt: CreationOptional<Date>;
}
export type EstimateAttributes = InferAttributes<Estimate>;
export type EstimateCreationAttributes = InferCreationAttributes<Estimate>;

/** Define Estimate on `sequelize`. */
export function initEstimate(sequelize: Sequelize, M: typeof Estimate = Estimate): typeof Estimate {
  M.init(
    {
      id: uuidPk(),
      scope: { type: DataTypes.TEXT, allowNull: false },
      runId: { type: DataTypes.UUID, allowNull: true },
      pointId: { type: DataTypes.UUID, allowNull: false },
      ensembleId: { type: DataTypes.UUID, allowNull: false },
      observable: { type: DataTypes.TEXT, allowNull: false },
      mean: { type: DataTypes.DOUBLE, allowNull: false },
      error: { type: DataTypes.DOUBLE, allowNull: false },
      tauInt: { type: DataTypes.DOUBLE, allowNull: true },
      tauIntError: { type: DataTypes.DOUBLE, allowNull: true },
      thermCut: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
      n: { type: DataTypes.INTEGER, allowNull: false },
      window: { type: DataTypes.INTEGER, allowNull: true },
      method: { type: DataTypes.TEXT, allowNull: false },
      analysisVersion: { type: DataTypes.TEXT, allowNull: false },
      version: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 1 },
      isCurrent: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
      chosenById: { type: DataTypes.UUID, allowNull: true },
      chosenAt: { type: DataTypes.DATE, allowNull: true },
      chi2dof: { type: DataTypes.DOUBLE, allowNull: true, field: "chi2dof" },
      flagged: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
      params: { type: DataTypes.JSONB, allowNull: false, defaultValue: {} },
      createdAt: { type: DataTypes.DATE },
    },
    { sequelize, modelName: "Estimate", tableName: "estimates", underscored: true, timestamps: true, updatedAt: false },
  );
  return M;
}

// How an ended ensemble's achieved errors compared with the planner prediction it followed (lib/planner/record-outcome.ts).
import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from "sequelize";
import { uuidPk } from "./columns";

export class PlannerOutcome extends Model<InferAttributes<PlannerOutcome>, InferCreationAttributes<PlannerOutcome>> {
  declare id: CreationOptional<string>;
  declare predictionId: string;
  declare ensembleId: string;
  declare groupId: string;
  declare observable: string;
  declare targetError: number;
  /** The largest over the points. */
  declare predictedError: number;
  declare achievedError: number;
  /** Geometric mean over the points of achieved ÷ predicted, χ²-scaled point errors. */
  declare ratio: number;
  /** The same with the unscaled inverse-variance combination of the replicas. */
  declare statRatio: number;
  declare pointsCompared: number;
  /** Per point: params, predicted, achieved (both), ratios, n kept (lib/planner/list-record.ts OutcomePoint). */
  declare points: Record<string, unknown>[];
  declare recordedAt: CreationOptional<Date>;
}

/** Define PlannerOutcome on `sequelize`. */
export function initPlannerOutcome(sequelize: Sequelize, M: typeof PlannerOutcome = PlannerOutcome): typeof PlannerOutcome {
  M.init(
    {
      id: uuidPk(),
      predictionId: { type: DataTypes.UUID, allowNull: false },
      ensembleId: { type: DataTypes.UUID, allowNull: false },
      groupId: { type: DataTypes.UUID, allowNull: false },
      observable: { type: DataTypes.TEXT, allowNull: false },
      targetError: { type: DataTypes.DOUBLE, allowNull: false },
      predictedError: { type: DataTypes.DOUBLE, allowNull: false },
      achievedError: { type: DataTypes.DOUBLE, allowNull: false },
      ratio: { type: DataTypes.DOUBLE, allowNull: false },
      statRatio: { type: DataTypes.DOUBLE, allowNull: false },
      pointsCompared: { type: DataTypes.INTEGER, allowNull: false },
      points: { type: DataTypes.JSONB, allowNull: false },
      recordedAt: { type: DataTypes.DATE, allowNull: false, defaultValue: DataTypes.NOW },
    },
    { sequelize, modelName: "PlannerOutcome", tableName: "planner_outcomes", underscored: true, timestamps: false },
  );
  return M;
}

// A planner prediction as it was made: the request, the plan and the estimates it rested on (lib/planner).
import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from "sequelize";
import { uuidPk } from "./columns";

export class PlannerPrediction extends Model<InferAttributes<PlannerPrediction>, InferCreationAttributes<PlannerPrediction>> {
  declare id: CreationOptional<string>;
  declare userId: string;
  declare sampler: string;
  declare observable: string;
  declare targetError: number;
  declare replicas: number;
  /** Measurements per replica the plan prescribes (need + thermalisation allowance). */
  declare measurements: number;
  declare interval: number;
  /** Expected charge; null when the pilots recorded no run times. */
  declare coreHours: number | null;
  declare pilotEnsembleId: string | null;
  declare request: Record<string, unknown>;
  /** The Plan (lib/planner/types.ts) with its inputs. */
  declare plan: Record<string, unknown>;
  declare createdAt: CreationOptional<Date>;
}

/** Define PlannerPrediction on `sequelize`. */
export function initPlannerPrediction(sequelize: Sequelize, M: typeof PlannerPrediction = PlannerPrediction): typeof PlannerPrediction {
  M.init(
    {
      id: uuidPk(),
      userId: { type: DataTypes.UUID, allowNull: false },
      sampler: { type: DataTypes.TEXT, allowNull: false },
      observable: { type: DataTypes.TEXT, allowNull: false },
      targetError: { type: DataTypes.DOUBLE, allowNull: false },
      replicas: { type: DataTypes.INTEGER, allowNull: false },
      measurements: { type: DataTypes.INTEGER, allowNull: false },
      interval: { type: DataTypes.INTEGER, allowNull: false },
      coreHours: { type: DataTypes.DOUBLE, allowNull: true },
      pilotEnsembleId: { type: DataTypes.UUID, allowNull: true },
      request: { type: DataTypes.JSONB, allowNull: false },
      plan: { type: DataTypes.JSONB, allowNull: false },
      createdAt: { type: DataTypes.DATE },
    },
    { sequelize, modelName: "PlannerPrediction", tableName: "planner_predictions", underscored: true, timestamps: true, updatedAt: false },
  );
  return M;
}

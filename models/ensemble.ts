// An ensemble: one sampler run at many parameter points, several replicas each, from one spec.
import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type NonAttribute, type Sequelize } from "sequelize";
import { asNumber, common, CORE_HOURS, TIMESTAMPS, uuidPk } from "./columns";
import type { ParameterPoint } from "./parameter-point";
import type { Run } from "./run";
import type { Sampler } from "./sampler";

export const ENSEMBLE_STATES = ["active", "done", "failed", "cancelled"] as const;
export type EnsembleState = (typeof ENSEMBLE_STATES)[number];

export class Ensemble extends Model<InferAttributes<Ensemble>, InferCreationAttributes<Ensemble>> {
  declare id: CreationOptional<string>;
  declare name: string;
  declare description: CreationOptional<string | null>;
  declare ownerId: string;
  declare groupId: string;
  declare samplerId: string;
  /** null only for an archive of uploaded runs, which spend no allocation. */
  declare allocationId: string | null;
  /** null only for an archive of uploaded runs. */
  declare clusterId: string | null;
  /** The validated submission spec, as submitted. */
  declare spec: Record<string, unknown>;
  /** sha256 (hex) of the canonical spec; equal specs may be submitted again. */
  declare specHash: string;
  /** Unsigned 64-bit integer in decimal, the root of every run's seed. */
  declare masterSeed: string;
  declare tags: CreationOptional<string[]>;
  declare state: CreationOptional<EnsembleState>;
  /** Core-hours reserved on the allocation at submission. */
  declare reservedCoreHours: CreationOptional<number>;
  declare finishedAt: CreationOptional<Date | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  declare points?: NonAttribute<ParameterPoint[]>;
  declare runs?: NonAttribute<Run[]>;
  declare sampler?: NonAttribute<Sampler>;
}
export type EnsembleAttributes = InferAttributes<Ensemble>;
export type EnsembleCreationAttributes = InferCreationAttributes<Ensemble>;

/** Define Ensemble on `sequelize`. */
export function initEnsemble(sequelize: Sequelize, M: typeof Ensemble = Ensemble): typeof Ensemble {
  M.init(
    {
      id: uuidPk(),
      name: { type: DataTypes.TEXT, allowNull: false },
      description: { type: DataTypes.TEXT, allowNull: true },
      ownerId: { type: DataTypes.UUID, allowNull: false },
      groupId: { type: DataTypes.UUID, allowNull: false },
      samplerId: { type: DataTypes.UUID, allowNull: false },
      allocationId: { type: DataTypes.UUID, allowNull: true },
      clusterId: { type: DataTypes.UUID, allowNull: true },
      spec: { type: DataTypes.JSONB, allowNull: false },
      specHash: { type: DataTypes.CHAR(64), allowNull: false },
      masterSeed: { type: DataTypes.TEXT, allowNull: false },
      tags: { type: DataTypes.ARRAY(DataTypes.TEXT), allowNull: false, defaultValue: [] },
      state: { type: DataTypes.TEXT, allowNull: false, defaultValue: "active" },
      reservedCoreHours: asNumber(CORE_HOURS, "reservedCoreHours", { allowNull: false, defaultValue: 0 }),
      finishedAt: { type: DataTypes.DATE, allowNull: true },
      ...TIMESTAMPS,
    },
    { sequelize, modelName: "Ensemble", tableName: "ensembles", ...common },
  );
  return M;
}

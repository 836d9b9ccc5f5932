// One version of a sampler code: how to run it, which parameters it takes, which observables it emits.
import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from "sequelize";
import { common, TIMESTAMPS, uuidPk } from "./columns";

/** An observable a sampler writes as a series column. */
export type ObservableInfo = { name: string; description: string };

export class Sampler extends Model<InferAttributes<Sampler>, InferCreationAttributes<Sampler>> {
  declare id: CreationOptional<string>;
  declare name: string;
  declare version: string;
  declare command: string;
  /** JSON Schema (2020-12) of the sampler's params object. */
  declare paramsSchema: Record<string, unknown>;
  declare observables: CreationOptional<ObservableInfo[]>;
  /** Hash (or VCS commit) of the code this version denotes, for provenance. */
  declare codeHash: CreationOptional<string | null>;
  declare description: CreationOptional<string | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}
export type SamplerAttributes = InferAttributes<Sampler>;
export type SamplerCreationAttributes = InferCreationAttributes<Sampler>;

/** Define Sampler on `sequelize`. */
export function initSampler(sequelize: Sequelize, M: typeof Sampler = Sampler): typeof Sampler {
  M.init(
    {
      id: uuidPk(),
      name: { type: DataTypes.TEXT, allowNull: false },
      version: { type: DataTypes.TEXT, allowNull: false },
      command: { type: DataTypes.TEXT, allowNull: false },
      paramsSchema: { type: DataTypes.JSONB, allowNull: false },
      observables: { type: DataTypes.JSONB, allowNull: false, defaultValue: [] },
      codeHash: { type: DataTypes.TEXT, allowNull: true },
      description: { type: DataTypes.TEXT, allowNull: true },
      ...TIMESTAMPS,
    },
    { sequelize, modelName: "Sampler", tableName: "samplers", ...common },
  );
  return M;
}

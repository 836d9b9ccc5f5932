// Which archived file is which file of a run's bundle.
import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type NonAttribute, type Sequelize } from "sequelize";
import type { Artifact } from "./artifact";

export const RUN_ARTIFACT_ROLES = ["manifest", "series", "extra", "checkpoint"] as const;
export type RunArtifactRole = (typeof RUN_ARTIFACT_ROLES)[number];

export class RunArtifact extends Model<InferAttributes<RunArtifact>, InferCreationAttributes<RunArtifact>> {
  declare runId: string;
  /** Relative file name within the bundle; (runId, path) is the primary key. */
  declare path: string;
  declare artifactSha256: string;
  declare role: RunArtifactRole;
  declare createdAt: CreationOptional<Date>;

  declare artifact?: NonAttribute<Artifact>;
}
export type RunArtifactAttributes = InferAttributes<RunArtifact>;
export type RunArtifactCreationAttributes = InferCreationAttributes<RunArtifact>;

/** Define RunArtifact on `sequelize`. */
export function initRunArtifact(sequelize: Sequelize, M: typeof RunArtifact = RunArtifact): typeof RunArtifact {
  M.init(
    {
      runId: { type: DataTypes.UUID, allowNull: false, primaryKey: true },
      path: { type: DataTypes.TEXT, allowNull: false, primaryKey: true },
      artifactSha256: { type: DataTypes.CHAR(64), allowNull: false, field: "artifact_sha256" },
      role: { type: DataTypes.TEXT, allowNull: false },
      createdAt: { type: DataTypes.DATE },
    },
    { sequelize, modelName: "RunArtifact", tableName: "run_artifacts", underscored: true, timestamps: true, updatedAt: false },
  );
  return M;
}

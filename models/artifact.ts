// A content-addressed archived file: its sha256 is its identity.
import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from "sequelize";
import { asNumber } from "./columns";

export class Artifact extends Model<InferAttributes<Artifact>, InferCreationAttributes<Artifact>> {
  /** sha256 of the content, lower-case hex; the primary key. */
  declare sha256: string;
  declare bytes: number;
  declare mediaType: string;
  /** Path under the archive directory (lib/env.ts archiveDir). */
  declare storagePath: string;
  declare createdAt: CreationOptional<Date>;
}
export type ArtifactAttributes = InferAttributes<Artifact>;
export type ArtifactCreationAttributes = InferCreationAttributes<Artifact>;

/** Define Artifact on `sequelize`. */
export function initArtifact(sequelize: Sequelize, M: typeof Artifact = Artifact): typeof Artifact {
  M.init(
    {
      sha256: { type: DataTypes.CHAR(64), primaryKey: true },
      bytes: asNumber(DataTypes.BIGINT, "bytes", { allowNull: false }),
      mediaType: { type: DataTypes.TEXT, allowNull: false },
      storagePath: { type: DataTypes.TEXT, allowNull: false },
      createdAt: { type: DataTypes.DATE },
    },
    { sequelize, modelName: "Artifact", tableName: "artifacts", underscored: true, timestamps: true, updatedAt: false },
  );
  return M;
}

// A programmatic credential; only its sha256 is stored, the secret is shown once.
import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type NonAttribute, type Sequelize } from "sequelize";
import { common, TIMESTAMPS, uuidPk } from "./columns";
import type { User } from "./user";

export class ApiToken extends Model<InferAttributes<ApiToken>, InferCreationAttributes<ApiToken>> {
  declare id: CreationOptional<string>;
  declare userId: string;
  declare name: string;
  /** sha256 of the raw token, lower-case hex. */
  declare tokenHash: string;
  /** The first characters of the raw token, shown in lists to tell tokens apart. */
  declare prefix: string;
  declare expiresAt: CreationOptional<Date | null>;
  declare revokedAt: CreationOptional<Date | null>;
  declare lastUsedAt: CreationOptional<Date | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  declare user?: NonAttribute<User>;
}
export type ApiTokenAttributes = InferAttributes<ApiToken>;
export type ApiTokenCreationAttributes = InferCreationAttributes<ApiToken>;

/** Define ApiToken on `sequelize`. */
export function initApiToken(sequelize: Sequelize, M: typeof ApiToken = ApiToken): typeof ApiToken {
  M.init(
    {
      id: uuidPk(),
      userId: { type: DataTypes.UUID, allowNull: false },
      name: { type: DataTypes.TEXT, allowNull: false },
      tokenHash: { type: DataTypes.CHAR(64), allowNull: false },
      prefix: { type: DataTypes.TEXT, allowNull: false },
      expiresAt: { type: DataTypes.DATE, allowNull: true },
      revokedAt: { type: DataTypes.DATE, allowNull: true },
      lastUsedAt: { type: DataTypes.DATE, allowNull: true },
      ...TIMESTAMPS,
    },
    { sequelize, modelName: "ApiToken", tableName: "api_tokens", ...common },
  );
  return M;
}

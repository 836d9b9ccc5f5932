// One sign-in attempt, kept for rate limiting by e-mail and by address.
import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from "sequelize";
import { bigintPk } from "./columns";

export class SignInAttempt extends Model<InferAttributes<SignInAttempt>, InferCreationAttributes<SignInAttempt>> {
  /** bigint identity, as a string. */
  declare id: CreationOptional<string>;
  declare email: string;
  declare ip: string | null;
  declare succeeded: boolean;
  declare createdAt: CreationOptional<Date>;
}
export type SignInAttemptAttributes = InferAttributes<SignInAttempt>;
export type SignInAttemptCreationAttributes = InferCreationAttributes<SignInAttempt>;

/** Define SignInAttempt on `sequelize`. */
export function initSignInAttempt(sequelize: Sequelize, M: typeof SignInAttempt = SignInAttempt): typeof SignInAttempt {
  M.init(
    {
      id: bigintPk(),
      email: { type: DataTypes.TEXT, allowNull: false },
      ip: { type: DataTypes.TEXT, allowNull: true },
      succeeded: { type: DataTypes.BOOLEAN, allowNull: false },
      createdAt: { type: DataTypes.DATE },
    },
    { sequelize, modelName: "SignInAttempt", tableName: "sign_in_attempts", underscored: true, timestamps: true, updatedAt: false },
  );
  return M;
}

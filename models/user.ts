// A person who signs in. Deactivated rather than deleted: audit entries keep pointing at them.
import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type NonAttribute, type Sequelize } from "sequelize";
import { common, TIMESTAMPS, uuidPk } from "./columns";
import type { Membership } from "./membership";
import type { Group } from "./group";

export const USER_ROLES = ["viewer", "researcher", "pi", "coordinator", "admin"] as const;
/** What a user may do; see the role table in DESIGN.md. */
export type UserRole = (typeof USER_ROLES)[number];

export class User extends Model<InferAttributes<User>, InferCreationAttributes<User>> {
  declare id: CreationOptional<string>;
  /** Always lower-case (the setter normalises, a CHECK enforces). */
  declare email: string;
  declare name: string;
  /** bcrypt hash; null means password sign-in is impossible. */
  declare passwordHash: string | null;
  declare role: UserRole;
  declare active: CreationOptional<boolean>;
  declare lastSignInAt: CreationOptional<Date | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  declare memberships?: NonAttribute<Membership[]>;
  declare groups?: NonAttribute<Group[]>;
}
export type UserAttributes = InferAttributes<User>;
export type UserCreationAttributes = InferCreationAttributes<User>;

/** Define User on `sequelize` (on a given subclass when several instances coexist). */
export function initUser(sequelize: Sequelize, M: typeof User = User): typeof User {
  M.init(
    {
      id: uuidPk(),
      email: {
        type: DataTypes.TEXT,
        allowNull: false,
        set(value: string) {
          this.setDataValue("email", typeof value === "string" ? value.trim().toLowerCase() : value);
        },
      },
      name: { type: DataTypes.TEXT, allowNull: false },
      passwordHash: { type: DataTypes.TEXT, allowNull: true },
      role: { type: DataTypes.TEXT, allowNull: false },
      active: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
      lastSignInAt: { type: DataTypes.DATE, allowNull: true },
      ...TIMESTAMPS,
    },
    { sequelize, modelName: "User", tableName: "users", ...common },
  );
  return M;
}

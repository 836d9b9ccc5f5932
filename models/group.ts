// A research group: the unit of data scope and of allocations.
import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type NonAttribute, type Sequelize } from "sequelize";
import { common, TIMESTAMPS, uuidPk } from "./columns";
import type { Membership } from "./membership";
import type { User } from "./user";

export class Group extends Model<InferAttributes<Group>, InferCreationAttributes<Group>> {
  declare id: CreationOptional<string>;
  /** URL-safe short name: lower-case letters, digits and dashes. */
  declare slug: string;
  declare name: string;
  declare institute: CreationOptional<string | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  declare memberships?: NonAttribute<Membership[]>;
  declare members?: NonAttribute<User[]>;
}
export type GroupAttributes = InferAttributes<Group>;
export type GroupCreationAttributes = InferCreationAttributes<Group>;

/** Define Group on `sequelize`. */
export function initGroup(sequelize: Sequelize, M: typeof Group = Group): typeof Group {
  M.init(
    {
      id: uuidPk(),
      slug: { type: DataTypes.TEXT, allowNull: false },
      name: { type: DataTypes.TEXT, allowNull: false },
      institute: { type: DataTypes.TEXT, allowNull: true },
      ...TIMESTAMPS,
    },
    { sequelize, modelName: "Group", tableName: "groups", ...common },
  );
  return M;
}

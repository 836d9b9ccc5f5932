// A user's membership of a group; a lead (isLead) is the PI acting on all of the group's ensembles.
import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type NonAttribute, type Sequelize } from "sequelize";
import { common, TIMESTAMPS } from "./columns";
import type { Group } from "./group";
import type { User } from "./user";

export class Membership extends Model<InferAttributes<Membership>, InferCreationAttributes<Membership>> {
  declare userId: string;
  declare groupId: string;
  declare isLead: CreationOptional<boolean>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  declare user?: NonAttribute<User>;
  declare group?: NonAttribute<Group>;
}
export type MembershipAttributes = InferAttributes<Membership>;
export type MembershipCreationAttributes = InferCreationAttributes<Membership>;

/** Define Membership on `sequelize`; its primary key is the (userId, groupId) pair. */
export function initMembership(sequelize: Sequelize, M: typeof Membership = Membership): typeof Membership {
  M.init(
    {
      userId: { type: DataTypes.UUID, allowNull: false, primaryKey: true },
      groupId: { type: DataTypes.UUID, allowNull: false, primaryKey: true },
      isLead: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
      ...TIMESTAMPS,
    },
    { sequelize, modelName: "Membership", tableName: "memberships", ...common },
  );
  return M;
}

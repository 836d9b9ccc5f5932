// A saved explorer view: the query (filters, sort, columns) and optionally its plot, owned by a person and shared with one group.
import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from "sequelize";
import { common, TIMESTAMPS, uuidPk } from "./columns";

/** How a view is plotted: x parameter, line grouping and axis scales. */
export type SavedViewPlot = { x: string; groupBy: string; logX?: boolean; logY?: boolean };

export class SavedView extends Model<InferAttributes<SavedView>, InferCreationAttributes<SavedView>> {
  declare id: CreationOptional<string>;
  declare name: string;
  /** The explorer query (lib/explorer/query.ts ExplorerQuery), as JSON. */
  declare query: Record<string, unknown>;
  declare plot: CreationOptional<SavedViewPlot | null>;
  /** The canonical URL query string of `query`, for links and exhibits. */
  declare queryString: string;
  declare ownerId: string;
  /** The group whose members may read the view. */
  declare groupId: string;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}
export type SavedViewAttributes = InferAttributes<SavedView>;
export type SavedViewCreationAttributes = InferCreationAttributes<SavedView>;

/** Define SavedView on `sequelize`. */
export function initSavedView(sequelize: Sequelize, M: typeof SavedView = SavedView): typeof SavedView {
  M.init(
    {
      id: uuidPk(),
      name: { type: DataTypes.TEXT, allowNull: false },
      query: { type: DataTypes.JSONB, allowNull: false },
      plot: { type: DataTypes.JSONB, allowNull: true },
      queryString: { type: DataTypes.TEXT, allowNull: false },
      ownerId: { type: DataTypes.UUID, allowNull: false },
      groupId: { type: DataTypes.UUID, allowNull: false },
      ...TIMESTAMPS,
    },
    { sequelize, modelName: "SavedView", tableName: "saved_views", ...common },
  );
  return M;
}

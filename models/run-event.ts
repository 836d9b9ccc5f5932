// One state change of a run, with its time and cause; written by lib/runs/transition-run.ts.
import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from "sequelize";
import { bigintPk } from "./columns";
import type { RunState } from "./run";

export class RunEvent extends Model<InferAttributes<RunEvent>, InferCreationAttributes<RunEvent>> {
  /** bigint identity, as a string. */
  declare id: CreationOptional<string>;
  declare runId: string;
  /** null for the event that records the run's creation. */
  declare fromState: RunState | null;
  declare toState: RunState;
  /** Short machine-readable cause, e.g. "broker.dispatch", "poll.finished", "user.cancel". */
  declare cause: string;
  declare detail: CreationOptional<Record<string, unknown>>;
  declare actorId: CreationOptional<string | null>;
  declare createdAt: CreationOptional<Date>;
}
export type RunEventAttributes = InferAttributes<RunEvent>;
export type RunEventCreationAttributes = InferCreationAttributes<RunEvent>;

/** Define RunEvent on `sequelize`. */
export function initRunEvent(sequelize: Sequelize, M: typeof RunEvent = RunEvent): typeof RunEvent {
  M.init(
    {
      id: bigintPk(),
      runId: { type: DataTypes.UUID, allowNull: false },
      fromState: { type: DataTypes.TEXT, allowNull: true },
      toState: { type: DataTypes.TEXT, allowNull: false },
      cause: { type: DataTypes.TEXT, allowNull: false },
      detail: { type: DataTypes.JSONB, allowNull: false, defaultValue: {} },
      actorId: { type: DataTypes.UUID, allowNull: true },
      createdAt: { type: DataTypes.DATE },
    },
    { sequelize, modelName: "RunEvent", tableName: "run_events", underscored: true, timestamps: true, updatedAt: false },
  );
  return M;
}

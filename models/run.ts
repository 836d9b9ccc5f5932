// One Markov chain: a replica at a parameter point. Its state changes only via lib/runs/transition-run.ts.
import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type NonAttribute, type Sequelize } from "sequelize";
import { asNumber, common, CORE_HOURS, TIMESTAMPS, uuidPk } from "./columns";
import type { Ensemble } from "./ensemble";
import type { ParameterPoint } from "./parameter-point";
import type { RunEvent } from "./run-event";

export const RUN_STATES = ["queued", "dispatched", "running", "collecting", "done", "failed", "cancelled"] as const;
export type RunState = (typeof RUN_STATES)[number];
/** States a run never leaves (failed may be re-queued for a retry, so it is not here). */
export const FINAL_RUN_STATES: readonly RunState[] = ["done", "cancelled"];

export const FAILURE_REASONS = [
  "nonzero_exit", "wall_time_exceeded", "node_lost", "connection_lost", "import_rejected", "cancelled_by_user", "dispatch_failed",
] as const;
export type FailureReason = (typeof FAILURE_REASONS)[number];

export const RUN_SOURCES = ["cluster", "upload"] as const;
export type RunSource = (typeof RUN_SOURCES)[number];

export class Run extends Model<InferAttributes<Run>, InferCreationAttributes<Run>> {
  declare id: CreationOptional<string>;
  declare ensembleId: string;
  declare pointId: string;
  /** 0-based replica number at the point; (pointId, replica) is unique. */
  declare replica: number;
  /** Unsigned 64-bit integer in decimal. */
  declare seed: string;
  declare state: CreationOptional<RunState>;
  /** 1 for the first try, +1 on every retry. */
  declare attempt: CreationOptional<number>;
  declare source: CreationOptional<RunSource>;
  declare cores: CreationOptional<number>;
  /** This run's share of the ensemble's reservation, released or charged at settlement. */
  declare reservedCoreHours: CreationOptional<number>;
  /** Recorded before submitting, so a crashed broker can ask the cluster what it already has. */
  declare dispatchToken: CreationOptional<string | null>;
  declare schedulerJobId: CreationOptional<string | null>;
  declare workDir: CreationOptional<string | null>;
  declare queuedAt: CreationOptional<Date>;
  declare dispatchedAt: CreationOptional<Date | null>;
  declare startedAt: CreationOptional<Date | null>;
  declare finishedAt: CreationOptional<Date | null>;
  declare exitCode: CreationOptional<number | null>;
  declare failureReason: CreationOptional<FailureReason | null>;
  declare failureDetail: CreationOptional<string | null>;
  declare stderrTail: CreationOptional<string | null>;
  /** Fraction done, 0..1. */
  declare progress: CreationOptional<number>;
  declare sweepsDone: CreationOptional<number>;
  declare sweepsTotal: CreationOptional<number | null>;
  declare coreHoursUsed: CreationOptional<number | null>;
  /** Sampler commit as reported by the result manifest. */
  declare samplerCommit: CreationOptional<string | null>;
  /** Host the chain ran on, from the manifest. */
  declare host: CreationOptional<string | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  declare ensemble?: NonAttribute<Ensemble>;
  declare point?: NonAttribute<ParameterPoint>;
  declare events?: NonAttribute<RunEvent[]>;
}
export type RunAttributes = InferAttributes<Run>;
export type RunCreationAttributes = InferCreationAttributes<Run>;

/** Define Run on `sequelize`. */
export function initRun(sequelize: Sequelize, M: typeof Run = Run): typeof Run {
  M.init(
    {
      id: uuidPk(),
      ensembleId: { type: DataTypes.UUID, allowNull: false },
      pointId: { type: DataTypes.UUID, allowNull: false },
      replica: { type: DataTypes.INTEGER, allowNull: false },
      seed: { type: DataTypes.TEXT, allowNull: false },
      state: { type: DataTypes.TEXT, allowNull: false, defaultValue: "queued" },
      attempt: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 1 },
      source: { type: DataTypes.TEXT, allowNull: false, defaultValue: "cluster" },
      cores: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 1 },
      reservedCoreHours: asNumber(CORE_HOURS, "reservedCoreHours", { allowNull: false, defaultValue: 0 }),
      dispatchToken: { type: DataTypes.TEXT, allowNull: true },
      schedulerJobId: { type: DataTypes.TEXT, allowNull: true },
      workDir: { type: DataTypes.TEXT, allowNull: true },
      queuedAt: { type: DataTypes.DATE, allowNull: false, defaultValue: DataTypes.NOW },
      dispatchedAt: { type: DataTypes.DATE, allowNull: true },
      startedAt: { type: DataTypes.DATE, allowNull: true },
      finishedAt: { type: DataTypes.DATE, allowNull: true },
      exitCode: { type: DataTypes.INTEGER, allowNull: true },
      failureReason: { type: DataTypes.TEXT, allowNull: true },
      failureDetail: { type: DataTypes.TEXT, allowNull: true },
      stderrTail: { type: DataTypes.TEXT, allowNull: true },
      progress: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 0 },
      sweepsDone: asNumber(DataTypes.BIGINT, "sweepsDone", { allowNull: false, defaultValue: 0 }),
      sweepsTotal: asNumber(DataTypes.BIGINT, "sweepsTotal", { allowNull: true }),
      coreHoursUsed: asNumber(CORE_HOURS, "coreHoursUsed", { allowNull: true }),
      samplerCommit: { type: DataTypes.TEXT, allowNull: true },
      host: { type: DataTypes.TEXT, allowNull: true },
      ...TIMESTAMPS,
    },
    { sequelize, modelName: "Run", tableName: "runs", ...common },
  );
  return M;
}

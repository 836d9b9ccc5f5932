// A compute cluster reached over SSH, with its host key pinned and its private key encrypted at rest.
import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from "sequelize";
import { common, TIMESTAMPS, uuidPk } from "./columns";

export const CLUSTER_KINDS = ["fake-ssh", "batch-ssh"] as const;
export type ClusterKind = (typeof CLUSTER_KINDS)[number];

/** Adapter settings; unknown keys are kept for adapters that need more. */
export type ClusterSettings = {
  partition?: string;
  account?: string;
  /** Shell lines run before the sampler (module loads and the like). */
  prelude?: string;
  /** Command that runs a sampler on the cluster, if not the default. */
  samplerCommand?: string;
  pollSeconds?: number;
  [key: string]: unknown;
};

export class Cluster extends Model<InferAttributes<Cluster>, InferCreationAttributes<Cluster>> {
  declare id: CreationOptional<string>;
  declare name: string;
  declare kind: ClusterKind;
  declare host: string;
  declare port: CreationOptional<number>;
  declare username: string;
  /** Pinned host key, as "SHA256:<base64>"; a different key refuses the connection. */
  declare hostKeyFingerprint: string;
  /** AES-256-GCM payload (lib/env.ts keyEncryptionKey), never the plain key. */
  declare privateKeyEncrypted: string;
  declare workDir: string;
  /** Most runs the broker keeps on the cluster at once. */
  declare slotLimit: number;
  /** false = the broker dispatches nothing new here. */
  declare active: CreationOptional<boolean>;
  declare healthy: CreationOptional<boolean>;
  declare healthNote: CreationOptional<string | null>;
  declare lastContactAt: CreationOptional<Date | null>;
  declare settings: CreationOptional<ClusterSettings>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}
export type ClusterAttributes = InferAttributes<Cluster>;
export type ClusterCreationAttributes = InferCreationAttributes<Cluster>;

/** Define Cluster on `sequelize`. */
export function initCluster(sequelize: Sequelize, M: typeof Cluster = Cluster): typeof Cluster {
  M.init(
    {
      id: uuidPk(),
      name: { type: DataTypes.TEXT, allowNull: false },
      kind: { type: DataTypes.TEXT, allowNull: false },
      host: { type: DataTypes.TEXT, allowNull: false },
      port: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 22 },
      username: { type: DataTypes.TEXT, allowNull: false },
      hostKeyFingerprint: { type: DataTypes.TEXT, allowNull: false },
      privateKeyEncrypted: { type: DataTypes.TEXT, allowNull: false },
      workDir: { type: DataTypes.TEXT, allowNull: false },
      slotLimit: { type: DataTypes.INTEGER, allowNull: false },
      active: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
      healthy: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
      healthNote: { type: DataTypes.TEXT, allowNull: true },
      lastContactAt: { type: DataTypes.DATE, allowNull: true },
      settings: { type: DataTypes.JSONB, allowNull: false, defaultValue: {} },
      ...TIMESTAMPS,
    },
    { sequelize, modelName: "Cluster", tableName: "clusters", ...common },
  );
  return M;
}

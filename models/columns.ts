// Column helpers shared by the models: ids, numeric and bigint read back as numbers.
import { DataTypes, type ModelAttributeColumnOptions, type Model } from "sequelize";

/** A uuid primary key filled in by PostgreSQL (gen_random_uuid()) or by Sequelize before insert. */
export const uuidPk = (): ModelAttributeColumnOptions => ({
  type: DataTypes.UUID,
  primaryKey: true,
  defaultValue: DataTypes.UUIDV4,
});

/** A bigint identity primary key; pg returns int8 as a string, so the attribute is a string. */
export const bigintPk = (): ModelAttributeColumnOptions => ({
  type: DataTypes.BIGINT,
  primaryKey: true,
  autoIncrement: true,
});

/** A non-null foreign key to a uuid column. */
export const uuidFk = (allowNull = false): ModelAttributeColumnOptions => ({ type: DataTypes.UUID, allowNull });

/**
 * numeric and bigint columns come back from pg as strings (they may exceed a double's range);
 * core-hours, byte counts and sweep counts fit comfortably, so the model hands out numbers.
 */
export function asNumber<M extends Model>(
  type: ModelAttributeColumnOptions["type"],
  attribute: string,
  options: Partial<ModelAttributeColumnOptions> = {},
): ModelAttributeColumnOptions<M> {
  return {
    type,
    ...options,
    get(this: M) {
      const raw = this.getDataValue(attribute as never) as unknown;
      return raw === null || raw === undefined ? raw : Number(raw);
    },
  } as ModelAttributeColumnOptions<M>;
}

/** numeric(16,4), the type of every core-hour amount. */
export const CORE_HOURS = DataTypes.DECIMAL(16, 4);

/** Timestamps as most tables have them (created_at and updated_at). */
export const TIMESTAMPS = { createdAt: { type: DataTypes.DATE }, updatedAt: { type: DataTypes.DATE } } as const;

/** Options every model shares. */
export const common = { underscored: true, timestamps: true } as const;

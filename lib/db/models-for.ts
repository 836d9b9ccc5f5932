// The models that belong to a transaction's connection, or the app's models without one.
import type { Sequelize, Transaction } from "sequelize";
import { db, initModels, type Models } from "@/models";

/**
 * Models bound to the same Sequelize instance as `transaction`, so that a caller working on
 * another database (an integration test, a migration check) is never mixed with the app's one.
 */
export function modelsFor(transaction?: Transaction | null): Models {
  if (!transaction) return db();
  // Transaction keeps its instance as a public field the type declarations leave out.
  const owner = (transaction as unknown as { sequelize?: Sequelize }).sequelize;
  return owner ? initModels(owner) : db();
}

// Indexes of the explorer's estimate queries (bench/explorer-scale.ts measured them): current
// estimates by scope with the default sort, by ensemble, and by observable with the mean sort.
import { runSql, type Migration } from "../lib/db/migration";

export const up: Migration = async ({ context: qi }) => {
  await runSql(qi, `
    -- NULLS LAST matches the explorer's ORDER BY, so a page is read off the index without a sort.
    CREATE INDEX estimates_current_scope_created ON estimates (scope, created_at DESC NULLS LAST, id DESC) WHERE is_current;
    CREATE INDEX estimates_current_ensemble ON estimates (ensemble_id, scope, observable) WHERE is_current;
    CREATE INDEX estimates_current_observable_mean ON estimates (scope, observable, mean, id) WHERE is_current;
  `);
};

export const down: Migration = async ({ context: qi }) => {
  await runSql(qi, `
    DROP INDEX estimates_current_observable_mean;
    DROP INDEX estimates_current_ensemble;
    DROP INDEX estimates_current_scope_created;
  `);
};

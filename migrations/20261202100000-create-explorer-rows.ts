// The explorer's summary of CURRENT estimates (bench/explorer-scale.ts measured why): one narrow row per
// current estimate with its ensemble's filter columns copied in (group, owner, sampler, tags, name), and
// one row per numeric parameter value, so every filter and sort of lib/explorer/build-query.ts is an
// index walk over one table instead of a scan of all estimates joined to their ensembles.
// Both are kept by statement-level triggers on estimates and ensembles, in the writer's transaction:
// no writer (lib/estimates, re-analysis, uploads, tests' bulk inserts) can leave them stale.
import { runSql, type Migration } from "../lib/db/migration";

export const up: Migration = async ({ context: qi }) => {
  await runSql(qi, `
    -- Its own schema: derived data the triggers keep, not a domain table (no model; the app never writes it).
    CREATE SCHEMA explorer;
    CREATE TABLE explorer.estimate_rows (
      estimate_id uuid PRIMARY KEY REFERENCES estimates (id) ON DELETE CASCADE,
      scope text NOT NULL,
      observable text NOT NULL,
      ensemble_id uuid NOT NULL,
      group_id uuid NOT NULL,
      owner_id uuid NOT NULL,
      sampler_id uuid NOT NULL,
      tags text[] NOT NULL,
      -- lower(ensembles.name): the explorer sorts ensembles case-insensitively
      ensemble_name text NOT NULL,
      mean double precision NOT NULL,
      error double precision NOT NULL,
      tau_int double precision,
      n integer NOT NULL,
      created_at timestamptz NOT NULL,
      params jsonb NOT NULL
    );
    -- Numeric parameter values of current estimates (JSON numbers only: "wolff" has no row here).
    CREATE TABLE explorer.param_values (
      estimate_id uuid NOT NULL REFERENCES explorer.estimate_rows (estimate_id) ON DELETE CASCADE,
      scope text NOT NULL,
      name text NOT NULL,
      num double precision NOT NULL,
      PRIMARY KEY (estimate_id, name)
    );

    -- A JSON number that double precision can hold (the cast would fail on 1e400 or 1e-400).
    CREATE FUNCTION explorer.is_float8(v jsonb) RETURNS boolean LANGUAGE sql IMMUTABLE AS $$
      SELECT CASE WHEN jsonb_typeof(v) = 'number'
        THEN abs((v #>> '{}')::numeric) < 1e308 AND (abs((v #>> '{}')::numeric) > 1e-307 OR (v #>> '{}')::numeric = 0) ELSE false END
    $$;

    CREATE FUNCTION explorer.sync_estimates() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN
      IF TG_OP = 'UPDATE' THEN
        DELETE FROM explorer.estimate_rows x USING old_rows o WHERE x.estimate_id = o.id;
      END IF;
      INSERT INTO explorer.estimate_rows (estimate_id, scope, observable, ensemble_id, group_id, owner_id, sampler_id, tags, ensemble_name,
                                 mean, error, tau_int, n, created_at, params)
        SELECT es.id, es.scope, es.observable, es.ensemble_id, e.group_id, e.owner_id, e.sampler_id, e.tags, lower(e.name),
               es.mean, es.error, es.tau_int, es.n, es.created_at, es.params
          FROM new_rows es JOIN ensembles e ON e.id = es.ensemble_id
         WHERE es.is_current;
      INSERT INTO explorer.param_values (estimate_id, scope, name, num)
        SELECT es.id, es.scope, j.key, (j.value #>> '{}')::double precision
          FROM new_rows es CROSS JOIN LATERAL jsonb_each(es.params) j
         WHERE es.is_current AND explorer.is_float8(j.value);
      RETURN NULL;
    END $$;
    CREATE TRIGGER estimates_explorer_insert AFTER INSERT ON estimates
      REFERENCING NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION explorer.sync_estimates();
    CREATE TRIGGER estimates_explorer_update AFTER UPDATE ON estimates
      REFERENCING OLD TABLE AS old_rows NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION explorer.sync_estimates();

    CREATE FUNCTION explorer.sync_ensembles() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN
      UPDATE explorer.estimate_rows x SET group_id = n.group_id, owner_id = n.owner_id, sampler_id = n.sampler_id, tags = n.tags, ensemble_name = lower(n.name)
        FROM new_rows n JOIN old_rows o ON o.id = n.id
       WHERE x.ensemble_id = n.id
         AND (n.group_id, n.owner_id, n.sampler_id, n.tags, n.name) IS DISTINCT FROM (o.group_id, o.owner_id, o.sampler_id, o.tags, o.name);
      RETURN NULL;
    END $$;
    CREATE TRIGGER ensembles_explorer_update AFTER UPDATE ON ensembles
      REFERENCING OLD TABLE AS old_rows NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION explorer.sync_ensembles();

    -- What is already there.
    INSERT INTO explorer.estimate_rows (estimate_id, scope, observable, ensemble_id, group_id, owner_id, sampler_id, tags, ensemble_name,
                               mean, error, tau_int, n, created_at, params)
      SELECT es.id, es.scope, es.observable, es.ensemble_id, e.group_id, e.owner_id, e.sampler_id, e.tags, lower(e.name),
             es.mean, es.error, es.tau_int, es.n, es.created_at, es.params
        FROM estimates es JOIN ensembles e ON e.id = es.ensemble_id WHERE es.is_current;
    INSERT INTO explorer.param_values (estimate_id, scope, name, num)
      SELECT x.estimate_id, x.scope, j.key, (j.value #>> '{}')::double precision
        FROM explorer.estimate_rows x CROSS JOIN LATERAL jsonb_each(x.params) j WHERE explorer.is_float8(j.value);
    -- Indexes after the copy: building one is far cheaper than growing it row by row.
    -- One index per sort column, each led by scope (every query names one): a page is read off the
    -- index in order and the other filters are checked on the narrow row.
    CREATE INDEX estimate_rows_created ON explorer.estimate_rows (scope, created_at, estimate_id);
    CREATE INDEX estimate_rows_mean ON explorer.estimate_rows (scope, mean, estimate_id);
    CREATE INDEX estimate_rows_error ON explorer.estimate_rows (scope, error, estimate_id);
    CREATE INDEX estimate_rows_tau ON explorer.estimate_rows (scope, tau_int, estimate_id) WHERE tau_int IS NOT NULL;
    CREATE INDEX estimate_rows_n ON explorer.estimate_rows (scope, n, estimate_id);
    CREATE INDEX estimate_rows_observable ON explorer.estimate_rows (scope, observable, estimate_id);
    CREATE INDEX estimate_rows_ensemble_name ON explorer.estimate_rows (scope, ensemble_name, estimate_id);
    CREATE INDEX estimate_rows_ensemble ON explorer.estimate_rows (ensemble_id, scope, observable);
    -- A researcher's queries are always within their groups.
    CREATE INDEX estimate_rows_group ON explorer.estimate_rows (group_id, scope, observable);

    CREATE INDEX param_values_sort ON explorer.param_values (scope, name, num, estimate_id);
    -- Serial plans only: on a small shared machine a parallel plan of these short index walks measured
    -- 50–470 ms where the serial one took a steady 30 ms (bench/explorer-scale.ts, page 40 sorted by T).
    ALTER TABLE explorer.estimate_rows SET (parallel_workers = 0);
    ALTER TABLE explorer.param_values SET (parallel_workers = 0);
    -- The replicas behind a plot's point estimates (lib/explorer/plot-series.ts), without the other observables' rows.
    CREATE INDEX estimates_current_run_point ON estimates (point_id, observable) WHERE is_current AND scope = 'run';
  `);
};

export const down: Migration = async ({ context: qi }) => {
  await runSql(qi, `
    DROP INDEX estimates_current_run_point;
    DROP TRIGGER ensembles_explorer_update ON ensembles;
    DROP TRIGGER estimates_explorer_update ON estimates;
    DROP TRIGGER estimates_explorer_insert ON estimates;
    DROP SCHEMA explorer CASCADE;
  `);
};

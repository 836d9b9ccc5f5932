// Estimates: one observable's mean, error and autocorrelation, per run or per parameter point.
import { runSql, type Migration } from "../lib/db/migration";

export const up: Migration = async ({ context: qi }) => {
  await runSql(qi, `
    CREATE TABLE estimates (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      scope text NOT NULL CHECK (scope IN ('run', 'point')),
      run_id uuid REFERENCES runs (id) ON DELETE CASCADE,
      point_id uuid NOT NULL REFERENCES parameter_points (id) ON DELETE CASCADE,
      ensemble_id uuid NOT NULL REFERENCES ensembles (id) ON DELETE CASCADE,
      observable text NOT NULL CHECK (length(observable) > 0),
      -- 'NaN' compares greater than every number in PostgreSQL, so it is excluded by name.
      mean double precision NOT NULL CHECK (mean <> 'NaN'),
      error double precision NOT NULL CHECK (error >= 0 AND error <> 'NaN'),
      tau_int double precision CHECK (tau_int <> 'NaN'),
      tau_int_error double precision CHECK (tau_int_error >= 0 AND tau_int_error <> 'NaN'),
      therm_cut integer NOT NULL DEFAULT 0 CHECK (therm_cut >= 0),
      n integer NOT NULL CHECK (n > 0),
      "window" integer CHECK ("window" > 0),
      method text NOT NULL,
      analysis_version text NOT NULL,
      version integer NOT NULL DEFAULT 1 CHECK (version >= 1),
      is_current boolean NOT NULL DEFAULT true,
      chosen_by_id uuid REFERENCES users (id) ON DELETE SET NULL,
      chosen_at timestamptz,
      chi2dof double precision CHECK (chi2dof >= 0),
      flagged boolean NOT NULL DEFAULT false,
      params jsonb NOT NULL DEFAULT '{}'::jsonb CHECK (jsonb_typeof(params) = 'object'),
      created_at timestamptz NOT NULL DEFAULT now(),
      CONSTRAINT estimates_scope_run CHECK ((scope = 'run') = (run_id IS NOT NULL))
    );
    -- At most one current estimate per (run or point, observable); older versions stay for provenance.
    CREATE UNIQUE INDEX estimates_one_current ON estimates (scope, coalesce(run_id, point_id), observable)
      WHERE is_current;
    CREATE UNIQUE INDEX estimates_version ON estimates (scope, coalesce(run_id, point_id), observable, version);
    CREATE INDEX estimates_observable_ensemble_id ON estimates (observable, ensemble_id);
    CREATE INDEX estimates_point_id ON estimates (point_id);
    CREATE INDEX estimates_run_id ON estimates (run_id);
    CREATE INDEX estimates_params ON estimates USING gin (params);
  `);
};

export const down: Migration = async ({ context: qi }) => {
  await runSql(qi, `DROP TABLE estimates;`);
};

// The archive: content-addressed files, which run they belong to, imports, measurement series.
import { runSql, type Migration } from "../lib/db/migration";

export const up: Migration = async ({ context: qi }) => {
  await runSql(qi, `
    CREATE TABLE artifacts (
      sha256 char(64) PRIMARY KEY CHECK (sha256 ~ '^[0-9a-f]{64}$'),
      bytes bigint NOT NULL CHECK (bytes >= 0),
      media_type text NOT NULL,
      storage_path text NOT NULL,
      created_at timestamptz NOT NULL DEFAULT now()
    );

    CREATE TABLE run_artifacts (
      run_id uuid NOT NULL REFERENCES runs (id) ON DELETE CASCADE,
      path text NOT NULL CHECK (length(path) > 0 AND path NOT LIKE '/%' AND path NOT LIKE '%..%'),
      artifact_sha256 char(64) NOT NULL REFERENCES artifacts (sha256) ON DELETE RESTRICT,
      role text NOT NULL CHECK (role IN ('manifest', 'series', 'extra', 'checkpoint')),
      created_at timestamptz NOT NULL DEFAULT now(),
      PRIMARY KEY (run_id, path)
    );
    CREATE INDEX run_artifacts_artifact_sha256 ON run_artifacts (artifact_sha256);

    CREATE TABLE imports (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      run_id uuid REFERENCES runs (id) ON DELETE SET NULL,
      source text NOT NULL CHECK (source IN ('cluster', 'upload')),
      uploaded_by_id uuid REFERENCES users (id) ON DELETE SET NULL,
      original_names jsonb NOT NULL DEFAULT '[]'::jsonb CHECK (jsonb_typeof(original_names) = 'array'),
      -- Unique so that importing the same bundle twice finds the first import instead.
      bundle_hash char(64) NOT NULL UNIQUE CHECK (bundle_hash ~ '^[0-9a-f]{64}$'),
      state text NOT NULL CHECK (state IN ('accepted', 'rejected')),
      reject_reason text,
      importer_version text NOT NULL,
      created_at timestamptz NOT NULL DEFAULT now(),
      CONSTRAINT imports_reject_reason CHECK ((state = 'rejected') = (reject_reason IS NOT NULL))
    );
    CREATE INDEX imports_run_id ON imports (run_id);
    CREATE INDEX imports_created_at ON imports (created_at);

    -- One row per chunk of consecutive measurements, not per value: a 10^5-sweep series of one
    -- observable is a few dozen rows, and COPY streams them in.
    CREATE TABLE series (
      run_id uuid NOT NULL REFERENCES runs (id) ON DELETE CASCADE,
      observable text NOT NULL CHECK (length(observable) > 0),
      chunk_index integer NOT NULL CHECK (chunk_index >= 0),
      start_row integer NOT NULL CHECK (start_row >= 0),
      "values" double precision[] NOT NULL
        CHECK (array_ndims("values") = 1 AND cardinality("values") > 0),
      PRIMARY KEY (run_id, observable, chunk_index)
    );
  `);
};

export const down: Migration = async ({ context: qi }) => {
  await runSql(qi, `
    DROP TABLE series;
    DROP TABLE imports;
    DROP TABLE run_artifacts;
    DROP TABLE artifacts;
  `);
};

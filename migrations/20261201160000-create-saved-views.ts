// Saved explorer views (query + plot), which manuscripts' exhibits refer to.
import { runSql, type Migration } from "../lib/db/migration";

export const up: Migration = async ({ context: qi }) => {
  await runSql(qi, `
    CREATE TABLE saved_views (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      name text NOT NULL CHECK (length(name) BETWEEN 1 AND 200),
      query jsonb NOT NULL CHECK (jsonb_typeof(query) = 'object'),
      plot jsonb CHECK (plot IS NULL OR jsonb_typeof(plot) = 'object'),
      query_string text NOT NULL,
      owner_id uuid NOT NULL REFERENCES users (id) ON DELETE RESTRICT,
      group_id uuid NOT NULL REFERENCES groups (id) ON DELETE RESTRICT,
      created_at timestamptz NOT NULL DEFAULT now(),
      updated_at timestamptz NOT NULL DEFAULT now()
    );
    CREATE INDEX saved_views_group_id ON saved_views (group_id, created_at);
    CREATE INDEX saved_views_owner_id ON saved_views (owner_id, created_at);
  `);
};

export const down: Migration = async ({ context: qi }) => {
  await runSql(qi, `DROP TABLE saved_views;`);
};

// The planner's record: each prediction as it was made, and, once an ensemble that used it has ended,
// how the achieved errors compared with it.
import { runSql, type Migration } from "../lib/db/migration";

export const up: Migration = async ({ context: qi }) => {
  await runSql(qi, `
    CREATE TABLE planner_predictions (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      user_id uuid NOT NULL REFERENCES users (id) ON DELETE RESTRICT,
      sampler text NOT NULL CHECK (length(sampler) > 0),
      observable text NOT NULL CHECK (length(observable) > 0),
      target_error double precision NOT NULL CHECK (target_error > 0 AND target_error <> 'NaN' AND target_error <> 'Infinity'),
      replicas integer NOT NULL CHECK (replicas > 0),
      measurements integer NOT NULL CHECK (measurements > 0),
      "interval" integer NOT NULL CHECK ("interval" > 0),
      core_hours double precision CHECK (core_hours >= 0 AND core_hours <> 'NaN'),
      pilot_ensemble_id uuid REFERENCES ensembles (id) ON DELETE SET NULL,
      request jsonb NOT NULL CHECK (jsonb_typeof(request) = 'object'),
      plan jsonb NOT NULL CHECK (jsonb_typeof(plan) = 'object'),
      created_at timestamptz NOT NULL DEFAULT now()
    );
    CREATE INDEX planner_predictions_user_id ON planner_predictions (user_id, created_at);

    CREATE TABLE planner_outcomes (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      prediction_id uuid NOT NULL REFERENCES planner_predictions (id) ON DELETE CASCADE,
      ensemble_id uuid NOT NULL REFERENCES ensembles (id) ON DELETE CASCADE,
      group_id uuid NOT NULL REFERENCES groups (id) ON DELETE CASCADE,
      observable text NOT NULL,
      target_error double precision NOT NULL CHECK (target_error > 0),
      -- the largest over the points: the point that decides whether the target was met
      predicted_error double precision NOT NULL CHECK (predicted_error > 0 AND predicted_error <> 'NaN'),
      achieved_error double precision NOT NULL CHECK (achieved_error >= 0 AND achieved_error <> 'NaN'),
      -- geometric mean over the points of achieved / predicted (stored point errors, χ²-scaled) and of the unscaled combination
      ratio double precision NOT NULL CHECK (ratio >= 0 AND ratio <> 'NaN'),
      stat_ratio double precision NOT NULL CHECK (stat_ratio >= 0 AND stat_ratio <> 'NaN'),
      points_compared integer NOT NULL CHECK (points_compared > 0),
      points jsonb NOT NULL CHECK (jsonb_typeof(points) = 'array'),
      recorded_at timestamptz NOT NULL DEFAULT now(),
      UNIQUE (ensemble_id, prediction_id)
    );
    CREATE INDEX planner_outcomes_group_id ON planner_outcomes (group_id, recorded_at);
    CREATE INDEX planner_outcomes_prediction_id ON planner_outcomes (prediction_id);
  `);
};

export const down: Migration = async ({ context: qi }) => {
  await runSql(qi, `DROP TABLE planner_outcomes; DROP TABLE planner_predictions;`);
};

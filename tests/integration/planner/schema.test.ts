// The planner tables refuse bad rows themselves: non-positive or NaN figures, one outcome per ensemble and prediction.
import { beforeAll, describe, expect, it } from "vitest";
import { makeEnsemble, makeGroup, makeUser, useTestDatabase } from "@/tests/support/db";

const t = useTestDatabase();
let userId = "";
let ensembleId = "";
let groupId = "";
beforeAll(async () => {
  const group = await makeGroup();
  const user = await makeUser("researcher", group);
  const { ensemble } = await makeEnsemble({ owner: user, group, cluster: null, points: [{ L: 4, T: 3 }], replicas: 1 });
  [userId, ensembleId, groupId] = [user.id, ensemble.id, group.id];
});

const prediction = (over: Record<string, unknown> = {}) => t.models.PlannerPrediction.create({
  userId, sampler: "ising2d", observable: "e", targetError: 0.01, replicas: 2, measurements: 100, interval: 1, coreHours: 1, pilotEnsembleId: null,
  request: {}, plan: {}, ...over,
});
const outcome = (predictionId: string, over: Record<string, unknown> = {}) => t.models.PlannerOutcome.create({
  predictionId, ensembleId, groupId, observable: "e", targetError: 0.01, predictedError: 0.01, achievedError: 0.011, ratio: 1.1, statRatio: 1.1,
  pointsCompared: 1, points: [], ...over,
});

describe("planner tables", () => {
  it("refuse a target error of 0 or NaN, and zero measurements", async () => {
    await expect(prediction({ targetError: 0 })).rejects.toThrow(/planner_predictions_target_error_check/);
    await expect(prediction({ targetError: NaN })).rejects.toThrow(/planner_predictions_target_error_check/);
    await expect(prediction({ measurements: 0 })).rejects.toThrow(/planner_predictions_measurements_check/);
  });

  it("refuse a NaN ratio and a second outcome of the same ensemble and prediction", async () => {
    const p = await prediction();
    await expect(outcome(p.id, { ratio: NaN })).rejects.toThrow(/planner_outcomes_ratio_check/);
    await outcome(p.id);
    await expect(outcome(p.id)).rejects.toMatchObject({ name: "SequelizeUniqueConstraintError" });
  });
});

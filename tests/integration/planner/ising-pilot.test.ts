// The planner on a real ising2d pilot: pilot ensemble through the broker and the fake node, a prediction
// for half the pilot's error, the longer ensemble it prescribes, and the recorded achieved/predicted factor.
// L = 8 at T = 3.0 (well above Tc ≈ 2.269, Onsager 1944) keeps tau_int of e to a few sweeps, so both
// ensembles take seconds.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { stopBoss } from "@/lib/queue/boss";
import { loadIdentity } from "@/lib/auth/identity";
import { predictEnsemble } from "@/lib/planner/predict";
import { listPlannerRecord } from "@/lib/planner/list-record";
import { useTestDatabase } from "@/tests/support/db";
import { db, type User } from "@/models";
import {
  BrokerProcess, freePort, isingSpec, makeCatalogSamplers, makeClusterRow, makePeople, removeTempDirs, startNode, startSmtp, submit, tempDir, waitFor,
} from "../broker/support";

const t = useTestDatabase();
const POINT = { L: 8, T: 3.0, algorithm: "metropolis" };
const R = 4;
let node: Awaited<ReturnType<typeof startNode>>;
let smtp: Awaited<ReturnType<typeof startSmtp>>;
let broker: BrokerProcess;
let people: { researcher: User; allocationName: string };
let cluster: string;

beforeAll(async () => {
  await makeCatalogSamplers();
  people = await makePeople();
  node = await startNode({ slots: 4 });
  smtp = await startSmtp();
  cluster = (await makeClusterRow(node.node, node.clientKey, { name: "planner-node" })).name;
  broker = new BrokerProcess(t, { dataDir: tempDir("broker"), smtpPort: smtp.port, healthPort: await freePort() });
  await broker.start();
}, 60_000);

afterAll(async () => {
  await broker?.stop();
  await Promise.all([node?.node.close(), smtp?.close(), stopBoss({ graceful: false })]);
  removeTempDirs();
});

const finished = (id: string) => waitFor(`ensemble ${id} ended`, async () => (await db().Ensemble.findByPk(id))!.state, (s) => s !== "active", 60_000, broker);
const spec = (over: Record<string, unknown>) => isingSpec(cluster, people.allocationName, { fixed: POINT, scan: [], replicas: R, ...over });

describe("planner on an ising2d pilot", () => {
  it("predicts the error of the longer ensemble it prescribes; the factor achieved/predicted is recorded", async () => {
    const pilot = await submit(people.researcher, spec({ thermalization: 200, measurements: 1000, seed: "31" }));
    expect(await finished(pilot.ensembleId)).toBe("done");
    const [pilotPoint] = await db().Estimate.findAll({ where: { ensembleId: pilot.ensembleId, scope: "point", observable: "e", isCurrent: true } });

    const who = (await loadIdentity(people.researcher.id, "session"))!;
    const targetError = pilotPoint.error / 2;
    const plan = await predictEnsemble(who, { sampler: "ising2d", observable: "e", targetError, replicas: R, params: POINT, pilotEnsembleId: pilot.ensembleId });
    const p = plan.points[0];
    expect(p.derivation).toEqual({ kind: "measured" });
    expect(plan.inputs).toHaveLength(R);
    // half the error needs four times the measurements the pilot kept (to within its own uncertainty)
    const kept = plan.inputs.reduce((a, c) => a + c.n, 0) / R;
    expect(Math.abs(p.measurementsNeeded / kept - 4)).toBeLessThan(4 * 3 * p.relUncertainty + 0.05);
    expect(plan.coreHours).toBeGreaterThan(0);

    const main = await submit(people.researcher, spec({
      thermalization: plan.request.thermalization, measurements: plan.measurements, seed: "32", tags: [plan.tag],
      resources: { cores: 1, wallMinutes: Math.max(plan.wallMinutes ?? 1, 2), memoryMb: 256 },
    }));
    expect(await finished(main.ensembleId)).toBe("done");

    const [outcome] = await listPlannerRecord(who, { ensembleId: main.ensembleId });
    expect(outcome, "an outcome is recorded when the ensemble ends").toBeDefined();
    expect(outcome.predictionId).toBe(plan.id);
    const op = outcome.points[0];
    // Uncertainty of the factor: the prediction's (half the relative uncertainty of 2·tau_int·variance,
    // from the pilots' error-of-error, Wolff 2004) and the achieved error's own error-of-error
    // sqrt((W + ½)/n) per chain, ÷ √R for R chains.
    const runs = await db().Estimate.findAll({ where: { ensembleId: main.ensembleId, scope: "run", observable: "e", isCurrent: true } });
    const eoe = Math.sqrt(runs.reduce((a, e) => a + (e.window! + 0.5) / e.n, 0) / runs.length / runs.length);
    const sigma = Math.sqrt((p.relUncertainty / 2) ** 2 + eoe ** 2);
    const charged = runs.length ? (await db().Run.sum("coreHoursUsed", { where: { ensembleId: main.ensembleId } })) : 0;
    console.info(`[planner] target ${targetError.toExponential(3)}; predicted ${op.predictedError.toExponential(3)} at n = ${op.n}; achieved ${op.achievedStatError.toExponential(3)} (unscaled), ${op.achievedError.toExponential(3)} (point estimate); factor ${op.statRatio.toFixed(3)} (unscaled), ${op.ratio.toFixed(3)} (χ²-scaled); σ(factor) ≈ ${sigma.toFixed(3)}; core-hours predicted ${plan.coreHours?.toFixed(5)}, charged ${Number(charged).toFixed(5)}`);
    // 4σ: a calibrated error bar fails this about once in 16,000 runs; a prediction off by 2× fails it always
    expect(Math.abs(op.statRatio - 1)).toBeLessThan(4 * sigma);
    // the stored point error is the unscaled one widened by sqrt(max(1, χ²/dof)) (PDG convention), never narrowed
    expect(op.ratio).toBeGreaterThanOrEqual(op.statRatio * (1 - 1e-9));
    expect(outcome.ratio).toBeCloseTo(op.ratio, 12); // one point: the geometric mean is that point's factor
  }, 150_000);
});

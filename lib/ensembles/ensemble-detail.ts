import "server-only";
// One ensemble as its page shows it: counts per state, core-hours from the ledger, points × replicas grid.
import { QueryTypes } from "sequelize";
import { AppError } from "@/lib/errors";
import { db, RUN_STATES } from "@/models";

/** One cell of the points × replicas grid. */
export type GridRun = { id: string; replica: number; seed: string; state: string; progress: number; attempt: number; failureReason: string | null };

/** Ensemble detail: the row, its counts, core-hours and grid. */
export async function ensembleDetail(ensembleId: string) {
  const m = db();
  const e = await m.Ensemble.findByPk(ensembleId, {
    include: [{ association: "sampler", attributes: ["id", "name", "version"] }, { association: "owner", attributes: ["id", "name", "email"] },
      { association: "allocation", attributes: ["id", "name"] }, { association: "cluster", attributes: ["id", "name", "healthy"] },
      { association: "group", attributes: ["id", "name"] }],
  });
  if (!e) throw new AppError("not_found", "ensemble not found");
  const [points, runs, ledger] = await Promise.all([
    m.ParameterPoint.findAll({ where: { ensembleId }, order: [["pointIndex", "ASC"]], attributes: ["id", "pointIndex", "params"] }),
    m.Run.findAll({ where: { ensembleId }, order: [["replica", "ASC"]], attributes: ["id", "pointId", "replica", "seed", "state", "progress", "attempt", "failureReason"] }),
    m.sequelize.query<{ kind: string; total: string }>(
      "SELECT kind, sum(core_hours) AS total FROM ledger_entries WHERE ensemble_id = $1 GROUP BY kind", { type: QueryTypes.SELECT, bind: [ensembleId] }),
  ]);
  const sum = (kind: string) => Number(ledger.find((l) => l.kind === kind)?.total ?? 0);
  const round = (x: number) => Math.round(x * 1e4) / 1e4;
  const counts = Object.fromEntries(RUN_STATES.map((s) => [s, 0])) as Record<string, number>;
  const byPoint = new Map<string, GridRun[]>();
  for (const r of runs) {
    counts[r.state] += 1;
    const cell = { id: r.id, replica: r.replica, seed: r.seed, state: r.state, progress: r.progress, attempt: r.attempt, failureReason: r.failureReason };
    (byPoint.get(r.pointId) ?? byPoint.set(r.pointId, []).get(r.pointId)!).push(cell);
  }
  const rel = e as unknown as Record<string, { get(o: { plain: true }): unknown } | null>;
  const plain = (k: string) => rel[k]?.get({ plain: true }) ?? null;
  return {
    id: e.id, name: e.name, description: e.description, state: e.state, tags: e.tags, spec: e.spec, specHash: e.specHash, masterSeed: e.masterSeed,
    createdAt: e.createdAt, finishedAt: e.finishedAt,
    sampler: plain("sampler"), owner: plain("owner"), group: plain("group"), allocation: plain("allocation"), cluster: plain("cluster"),
    counts: { total: runs.length, ...counts },
    progress: runs.length ? runs.reduce((a, r) => a + r.progress, 0) / runs.length : 0,
    coreHours: {
      reserved: sum("reserve"), charged: sum("charge"), released: sum("release"),
      held: round(sum("reserve") - sum("charge") - sum("release")),
    },
    replicas: Number((e.spec as { replicas?: number }).replicas ?? 0),
    points: points.map((p) => ({ id: p.id, index: p.pointIndex, params: p.params, runs: byPoint.get(p.id) ?? [] })),
  };
}

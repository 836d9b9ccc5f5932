import "server-only";
// One run as its page shows it: fields, point parameters, events timeline and current estimates.
import { AppError } from "@/lib/errors";
import { db } from "@/models";

/** Run detail with events (oldest first) and current run estimates. */
export async function runDetail(runId: string) {
  const m = db();
  const run = await m.Run.findByPk(runId, {
    include: [{ association: "point", attributes: ["id", "pointIndex", "params"] }, { association: "ensemble", attributes: ["id", "name", "groupId", "ownerId", "state"] }],
  });
  if (!run) throw new AppError("not_found", "run not found");
  const [events, estimates] = await Promise.all([
    m.RunEvent.findAll({ where: { runId }, order: [["createdAt", "ASC"], ["id", "ASC"]], include: [{ association: "actor", attributes: ["id", "name"] }] }),
    m.Estimate.findAll({ where: { runId, scope: "run", isCurrent: true }, order: [["observable", "ASC"]] }),
  ]);
  const { point, ensemble, ...fields } = run.get({ plain: true }) as unknown as Record<string, unknown> & { point: unknown; ensemble: unknown };
  return {
    ...fields, point, ensemble,
    events: events.map((ev) => ({ id: ev.id, at: ev.createdAt, from: ev.fromState, to: ev.toState, cause: ev.cause, detail: ev.detail,
      actor: (ev as unknown as { actor?: { id: string; name: string } | null }).actor ?? null })),
    estimates: estimates.map((es) => ({ observable: es.observable, mean: es.mean, error: es.error, tauInt: es.tauInt, tauIntError: es.tauIntError,
      n: es.n, thermCut: es.thermCut, window: es.window, method: es.method, analysisVersion: es.analysisVersion, version: es.version })),
  };
}

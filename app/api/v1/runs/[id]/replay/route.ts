// POST /api/v1/runs/:id/replay – replay a done run on its cluster and compare the series byte for byte (202, queued); GET – its replays, newest first
import { withAuth } from "@/lib/auth/guard";
import { ANY, RESEARCHERS } from "@/lib/auth/roles";
import { runTarget } from "@/lib/ensembles/ensemble-target";
import { replaysOfRun, replayStatus, requestReplay } from "@/lib/provenance/replay/replay-run";

export const dynamic = "force-dynamic";

export const POST = withAuth<{ id: string }>({ roles: RESEARCHERS, target: (p) => runTarget(p.id), access: "act" }, async (_req, { who, audit, params }) => {
  const { id, created } = await requestReplay(audit, who, params.id.toLowerCase());
  return Response.json({ data: await replayStatus(id), created }, { status: created ? 202 : 200 });
});

export const GET = withAuth<{ id: string }>({ roles: ANY, target: (p) => runTarget(p.id), access: "read" }, async (_req, { params }) =>
  Response.json({ data: await replaysOfRun(params.id.toLowerCase()) }));

// GET /api/v1/provenance/runs/:id/files/:sha256 – download one archived file of a run (content-addressed; the header x-sha256 names it)
import { withAuth } from "@/lib/auth/guard";
import { ANY } from "@/lib/auth/roles";
import { runTarget } from "@/lib/ensembles/ensemble-target";
import { archivedFileResponse } from "@/lib/provenance/archived-file";

export const dynamic = "force-dynamic";

export const GET = withAuth<{ id: string; sha256: string }>({ roles: ANY, target: (p) => runTarget(p.id), access: "read" }, async (_req, { params }) =>
  archivedFileResponse(params.id.toLowerCase(), params.sha256));

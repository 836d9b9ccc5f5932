// GET /api/v1/imports – imports within the caller's scope (who, when, original names, state, reason, run); ?source=&state=&page=&pageSize=
// POST /api/v1/imports – upload result bundles (multipart files of one bundle, or a .zip / .tar.gz of bundles); an outcome per bundle
import { withAuth } from "@/lib/auth/guard";
import { ANY, RESEARCHERS } from "@/lib/auth/roles";
import { prepareUpload } from "@/lib/uploads/deposit-upload";
import { progressStream } from "@/lib/uploads/progress-stream";
import { importQueryFrom, listImports } from "@/lib/uploads/list-imports";

export const dynamic = "force-dynamic";
export const runtime = "nodejs";

export const GET = withAuth({ roles: ANY }, async (req, { who }) =>
  Response.json(await listImports(who, importQueryFrom(new URL(req.url).searchParams))));

// With `Accept: application/x-ndjson` the answer streams one progress line per step, then the result
// line (docs/uploads.md); without it, one JSON answer once every bundle is done (API clients, the CLI).
export const POST = withAuth({ roles: RESEARCHERS }, async (req, { who, audit, log }) => {
  const prepared = await prepareUpload(req, who, audit);
  if ((req.headers.get("accept") ?? "").includes("application/x-ndjson")) return progressStream(prepared, log);
  const data = await prepared.deposit();
  return Response.json({ data }, { status: data.accepted > 0 ? 201 : 200 });
});

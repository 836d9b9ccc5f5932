// GET /api/v1/imports – imports within the caller's scope (who, when, original names, state, reason, run); ?source=&state=&page=&pageSize=
// POST /api/v1/imports – upload result bundles (multipart files of one bundle, or a .zip / .tar.gz of bundles); an outcome per bundle
import { withAuth } from "@/lib/auth/guard";
import { ANY, RESEARCHERS } from "@/lib/auth/roles";
import { depositUpload } from "@/lib/uploads/deposit-upload";
import { importQueryFrom, listImports } from "@/lib/uploads/list-imports";

export const dynamic = "force-dynamic";
export const runtime = "nodejs";

export const GET = withAuth({ roles: ANY }, async (req, { who }) =>
  Response.json(await listImports(who, importQueryFrom(new URL(req.url).searchParams))));

export const POST = withAuth({ roles: RESEARCHERS }, async (req, { who, audit }) => {
  const data = await depositUpload(req, who, audit);
  return Response.json({ data }, { status: data.accepted > 0 ? 201 : 200 });
});

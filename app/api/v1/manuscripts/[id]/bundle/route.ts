// GET /api/v1/manuscripts/:id/bundle – the manuscript bundle (.zip): README, data per exhibit as CSV, PROV-JSON, archived files, hashes
import { Readable } from "node:stream";
import { withAuth } from "@/lib/auth/guard";
import { ANY } from "@/lib/auth/roles";
import { manuscriptTarget } from "@/lib/manuscripts/access";
import { exportBundle } from "@/lib/manuscripts/export-bundle";

export const dynamic = "force-dynamic";

export const GET = withAuth<{ id: string }>({ roles: ANY, target: (p) => manuscriptTarget(p.id), access: "read" }, async (_req, { params }) => {
  const { filename, stream } = await exportBundle(params.id);
  return new Response(Readable.toWeb(stream) as ReadableStream, { headers: { "content-type": "application/zip", "content-disposition": `attachment; filename="${filename}"` } });
});

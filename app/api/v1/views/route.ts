// GET /api/v1/views – saved explorer views of the caller's groups (and their own)
// POST /api/v1/views – save an explorer view { name, query, plot?, groupId? }; 201
import { withAuth } from "@/lib/auth/guard";
import { ANY } from "@/lib/auth/roles";
import { createSavedView, listSavedViews, savedViewBodySchema } from "@/lib/explorer/saved-views";
import { AppError } from "@/lib/errors";
import { readJson } from "@/lib/http/read-json";

export const dynamic = "force-dynamic";

const int = (sp: URLSearchParams, k: string, max: number) => {
  const raw = sp.get(k);
  if (raw === null || raw === "") return undefined;
  const n = Number(raw);
  if (!Number.isInteger(n) || n < 1 || n > max) throw new AppError("invalid", `?${k} must be an integer from 1 to ${max}`, { issues: [{ path: `?${k}`, message: `must be an integer from 1 to ${max}` }] });
  return n;
};

export const GET = withAuth({ roles: ANY }, async (req, { who }) => {
  const sp = new URL(req.url).searchParams;
  return Response.json(await listSavedViews(who, { page: int(sp, "page", 100_000), pageSize: int(sp, "pageSize", 200) }));
});

export const POST = withAuth({ roles: ANY }, async (req, { who, audit }) => {
  const data = await createSavedView(audit, who, await readJson(req, savedViewBodySchema));
  return Response.json({ data }, { status: 201, headers: { location: `/api/v1/views/${data.id}` } });
});

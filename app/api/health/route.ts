// GET /api/health – liveness and database reachability, for the supervisor and monitors
import { db } from "@/models";

export const dynamic = "force-dynamic";

export async function GET() {
  const t0 = performance.now();
  try {
    await db().sequelize.query("select 1");
    return Response.json({ status: "ok", database: "ok", ms: Math.round(performance.now() - t0) });
  } catch (err) {
    return Response.json({ status: "degraded", database: "unreachable", error: (err as Error).message }, { status: 503 });
  }
}

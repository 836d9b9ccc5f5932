// POST /api/v1/ensembles/preview – what submitting this spec would do: points, runs, seeds, core-hours vs balance
import { withAuth } from "@/lib/auth/guard";
import { RESEARCHERS } from "@/lib/auth/roles";
import { previewSubmission } from "@/lib/ensembles/preview-submission";
import { readSpecRequest } from "@/lib/ensembles/read-spec-request";

export const dynamic = "force-dynamic";

export const POST = withAuth({ roles: RESEARCHERS }, async (req, { who }) =>
  Response.json({ data: await previewSubmission(who, await readSpecRequest(req)) }));

// GET /api/v1/schemas/ensemble-spec – the ensemble spec's JSON Schema (2020-12); public, for editors and the CLI
import { ensembleSpecSchema } from "@/lib/spec/schema";

// Not behind withAuth on purpose: a schema reveals nothing and editors fetch it without credentials.
export function GET() {
  return Response.json(ensembleSpecSchema, { headers: { "content-type": "application/schema+json", "cache-control": "public, max-age=300" } });
}

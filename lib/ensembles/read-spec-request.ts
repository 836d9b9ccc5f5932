import "server-only";
// A request body holding a spec file, JSON or YAML (by content, whatever the content type says).
import { readBodyText } from "@/lib/http/read-json";
import { env } from "@/lib/env";
import { parseSpec, type EnsembleSpec } from "@/lib/spec";

/**
 * Read the body under the size limit and parse it as a spec. Text, not readJson: a YAML file is
 * posted as it is (the CLI sends application/yaml); parseSpec tells JSON from YAML.
 */
export async function readSpecRequest(req: Request, limit = env.web.maxBodyBytes): Promise<EnsembleSpec> {
  return parseSpec(await readBodyText(req, limit, "a spec (JSON or YAML)"));
}

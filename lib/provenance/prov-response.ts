// A PROV-JSON document as an HTTP response: the document itself, or (?format=listing-csv|listing-json) the plain listing.
import { AppError } from "@/lib/errors";
import { provListing, provListingCsv } from "./listing";
import type { ProvDocument } from "./prov-document";

/** Respond with `doc` in the format `?format=` asks for (default PROV-JSON); `name` is the download's base name. */
export function provResponse(req: Request, doc: ProvDocument, name: string): Response {
  const format = new URL(req.url).searchParams.get("format") ?? "prov-json";
  if (format === "prov-json") return new Response(JSON.stringify(doc, null, 1), { headers: { "content-type": "application/json; charset=utf-8", "content-disposition": `inline; filename="${name}.prov.json"` } });
  if (format === "listing-json") return Response.json({ data: provListing(doc) });
  if (format === "listing-csv") return new Response(provListingCsv(doc), { headers: { "content-type": "text/csv; charset=utf-8", "content-disposition": `attachment; filename="${name}.provenance.csv"` } });
  throw new AppError("invalid", `?format must be prov-json, listing-json or listing-csv, not "${format}"`, { issues: [{ path: "?format", message: "unknown format" }] });
}

import { AppError } from "../errors";

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

/** A route's :id must be a UUID; anything else cannot exist, so it is "not found". */
export function uuidParam(value: string, what: string): string {
  if (!UUID.test(value)) throw new AppError("not_found", `${what} not found`);
  return value.toLowerCase();
}

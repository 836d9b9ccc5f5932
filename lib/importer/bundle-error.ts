// A refused bundle: AppError("invalid") whose message and details name the file and the line or field.
import { AppError } from "@/lib/errors";

/** Where in the bundle a problem is: the file, and a line/row/column or a manifest field. */
export type BundleLocation = { file: string; line?: number; row?: number; column?: string; field?: string };

/** An AppError("invalid") for a bundle problem, its message prefixed with the location. */
export function bundleError(where: BundleLocation, message: string): AppError {
  const parts = [where.file];
  if (where.field) parts.push(where.field);
  if (where.line !== undefined) parts.push(`line ${where.line}`);
  if (where.row !== undefined) parts.push(`row ${where.row}`);
  if (where.column !== undefined) parts.push(`column "${where.column}"`);
  return new AppError("invalid", `${parts.join(" ")}: ${message}`, { ...where });
}

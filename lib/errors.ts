// One error type with a code; the code decides the HTTP status in one place (httpStatus below).
export type ErrorCode =
  | "bad_request" | "invalid" | "unauthenticated" | "forbidden" | "not_found"
  | "conflict" | "too_large" | "rate_limited" | "insufficient_allocation" | "internal";

const STATUS: Record<ErrorCode, number> = {
  bad_request: 400, invalid: 422, unauthenticated: 401, forbidden: 403, not_found: 404,
  conflict: 409, too_large: 413, rate_limited: 429, insufficient_allocation: 409, internal: 500,
};

/** A field-level problem, located by JSON path (e.g. "/scan/0/values"). */
export type FieldIssue = { path: string; message: string };

/** The application's single error type; `details` are shown to the caller. */
export class AppError extends Error {
  constructor(public code: ErrorCode, message: string, public details?: { issues?: FieldIssue[]; [k: string]: unknown }) {
    super(message);
    this.name = "AppError";
  }
  get status(): number { return STATUS[this.code]; }
}

export const httpStatus = (code: ErrorCode) => STATUS[code];

/** JSON body of an error response: { error: { code, message, ...details } }. */
export function errorBody(err: AppError) {
  return { error: { code: err.code, message: err.message, ...(err.details ?? {}) } };
}

// The client's one way to read an /api/v1 route: JSON in, the route's error message out.

/** An API answer that was not 2xx, with the route's code and message. */
export class ApiError extends Error {
  constructor(public status: number, public code: string, message: string) {
    super(message);
    this.name = "ApiError";
  }
}

/** GET a JSON resource with the session cookie; throws ApiError with the route's own words on failure. */
export async function fetchJson<T>(url: string, signal?: AbortSignal): Promise<T> {
  const res = await fetch(url, { headers: { accept: "application/json" }, credentials: "same-origin", signal });
  const body = await res.json().catch(() => null);
  if (!res.ok) {
    const e = (body as { error?: { code?: string; message?: string } } | null)?.error;
    throw new ApiError(res.status, e?.code ?? "http_" + res.status, e?.message ?? `${url} answered ${res.status}`);
  }
  return body as T;
}

/** An API problem as the client sees it: the server's message, code and field. */
export class ApiError extends Error {
  constructor(
    message: string,
    readonly status: number,
    readonly code?: string,
    readonly field?: string,
  ) {
    super(message);
  }
}

/** fetch for Levelwire's route handlers: JSON in and out, problem+json turned into ApiError. */
export async function apiFetch<T>(url: string, init: { method?: string; body?: unknown } = {}): Promise<T> {
  const res = await fetch(url, {
    method: init.method ?? 'GET',
    headers: init.body === undefined ? undefined : { 'content-type': 'application/json' },
    body: init.body === undefined ? undefined : JSON.stringify(init.body),
    credentials: 'same-origin',
  });
  const data = (await res.json().catch(() => null)) as (T & { detail?: string; code?: string; field?: string }) | null;
  if (!res.ok) throw new ApiError(data?.detail ?? `Request failed (${res.status})`, res.status, data?.code, data?.field);
  return data as T;
}

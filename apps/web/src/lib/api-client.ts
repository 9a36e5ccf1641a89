/** The error body every API error carries. */
export interface ApiErrorBody {
  code: string;
  message: string;
  fieldErrors?: Record<string, string[]>;
}

export class ApiError extends Error {
  constructor(
    readonly status: number,
    readonly body: ApiErrorBody,
  ) {
    super(body.message);
    this.name = 'ApiError';
  }
}

/** The one HTTP client: JSON in and out, errors normalised to ApiError. */
export async function apiFetch<T>(path: string, init: RequestInit = {}): Promise<T> {
  const headers = new Headers(init.headers);
  if (init.body && !(init.body instanceof FormData) && !headers.has('content-type'))
    headers.set('content-type', 'application/json');
  headers.set('accept', 'application/json');
  const res = await fetch(path, { ...init, headers, credentials: 'same-origin' });
  const text = await res.text();
  const data: unknown = text ? JSON.parse(text) : undefined;
  if (!res.ok) {
    const body = (data as ApiErrorBody | undefined) ?? {
      code: 'http-error',
      message: res.statusText,
    };
    throw new ApiError(res.status, body);
  }
  return data as T;
}

/** A JSON write (POST, PATCH, PUT, DELETE) through the one client. */
export function apiSend<T>(
  path: string,
  method: 'POST' | 'PATCH' | 'PUT' | 'DELETE',
  body?: unknown,
): Promise<T> {
  return apiFetch<T>(path, {
    method,
    ...(body === undefined ? {} : { body: JSON.stringify(body) }),
  });
}

/** Query-string of defined values only, e.g. `?page=1&sort=due`. */
export function toQueryString(
  params: Record<string, string | number | boolean | undefined | null>,
) {
  const search = new URLSearchParams();
  for (const [k, v] of Object.entries(params)) {
    if (v !== undefined && v !== null && v !== '') search.set(k, String(v));
  }
  const s = search.toString();
  return s ? `?${s}` : '';
}

/** The 409 body of an edit made against a stale version (nothing was overwritten). */
export interface StaleEditBody extends ApiErrorBody {
  code: 'stale-version';
  yourVersion: number;
  currentVersion: number;
  current: Record<string, unknown>;
  yours: Record<string, unknown>;
}

export function isStaleEdit(error: unknown): error is ApiError & { body: StaleEditBody } {
  return error instanceof ApiError && error.status === 409 && error.body.code === 'stale-version';
}

/**
 * The one HTTP client. Reads go through `apiGet`; every write goes through `sendWrite`
 * (components/api/mutations.ts), which adds the CSRF token and an Idempotency-Key so that a
 * write can be queued and replayed safely when the phone loses signal.
 */
export interface ApiErrorBody {
  error: { id: string; message: string; fields?: Record<string, string> };
}

export class ApiError extends Error {
  constructor(
    readonly status: number,
    readonly id: string,
    message: string,
    readonly fields: Record<string, string> = {},
  ) {
    super(message);
  }
}

let csrfToken = '';
/** Kept current by the session query. */
export function setCsrfToken(token: string) {
  csrfToken = token;
}
export function getCsrfToken() {
  return csrfToken;
}

async function toError(res: Response): Promise<ApiError> {
  try {
    const body = (await res.json()) as Partial<ApiErrorBody>;
    if (body.error) return new ApiError(res.status, body.error.id, body.error.message, body.error.fields);
  } catch {
    // not JSON: fall through to a generic message
  }
  if (res.status === 503) return new ApiError(503, 'unavailable', 'Trimout is not reachable right now. Try again in a moment.');
  return new ApiError(res.status, 'http', `The server answered ${res.status}.`);
}

export async function request<T>(method: string, path: string, init: { body?: unknown; headers?: Record<string, string> } = {}): Promise<T> {
  let res: Response;
  try {
    res = await fetch(path, {
      method,
      credentials: 'same-origin',
      headers: {
        Accept: 'application/json',
        ...(init.body !== undefined ? { 'Content-Type': 'application/json' } : {}),
        ...init.headers,
      },
      body: init.body !== undefined ? JSON.stringify(init.body) : undefined,
    });
  } catch {
    throw new ApiError(0, 'offline', 'No connection to Trimout. Check your signal and try again.');
  }
  if (!res.ok) throw await toError(res);
  if (res.status === 204) return undefined as T;
  return (await res.json()) as T;
}

export function apiGet<T>(path: string): Promise<T> {
  return request<T>('GET', path);
}

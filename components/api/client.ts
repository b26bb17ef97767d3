/**
 * The one HTTP client. Reads go through `apiGet`; every write goes through `sendWrite`
 * (components/api/mutations.ts), which adds the CSRF token and an Idempotency-Key so that a
 * write can be queued and replayed safely when the phone loses signal.
 */
import { noteReached } from './reach';

export interface ApiErrorBody {
  error: { id: string; message: string; fields?: Record<string, string> };
}

export class ApiError extends Error {
  constructor(
    readonly status: number,
    readonly id: string,
    message: string,
    readonly fields: Record<string, string> = {},
    /** How long the server asked to wait before asking again (its Retry-After), when it said. */
    readonly retryAfterMs?: number,
  ) {
    super(message);
  }
}

/** A Retry-After header (RFC 9110 §10.2.3: seconds, or an HTTP date) as milliseconds from now. */
export function retryAfterMs(value: string | null, now = Date.now()): number | undefined {
  if (!value) return undefined;
  const text = value.trim();
  if (/^\d+$/.test(text)) return Number(text) * 1000;
  const at = Date.parse(text);
  return Number.isNaN(at) ? undefined : Math.max(0, at - now);
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
  const wait = retryAfterMs(res.headers.get('Retry-After'));
  try {
    const body = (await res.json()) as Partial<ApiErrorBody>;
    if (body.error) return new ApiError(res.status, body.error.id, body.error.message, body.error.fields, wait);
  } catch {
    // not JSON: fall through to a generic message
  }
  if (res.status === 503) return new ApiError(503, 'unavailable', 'Trimout is not reachable right now. Try again in a moment.', {}, wait);
  return new ApiError(res.status, 'http', `The server answered ${res.status}.`, {}, wait);
}

export interface WithMeta<T> {
  data: T;
  /** The record's version as the server sent it (ETag), for If-Match on a later change. */
  etag: string | null;
}

/** True for a multipart body (FormData), sent without JSON encoding. */
export function isFormData(body: unknown): body is FormData {
  return typeof FormData !== 'undefined' && body instanceof FormData;
}

export async function request<T>(method: string, path: string, init: { body?: unknown; headers?: Record<string, string> } = {}): Promise<T> {
  return (await requestWithMeta<T>(method, path, init)).data;
}

/** Like request(), and also hands back the response's ETag. */
export async function requestWithMeta<T>(
  method: string,
  path: string,
  init: { body?: unknown; headers?: Record<string, string> } = {},
): Promise<WithMeta<T>> {
  let res: Response;
  // A FormData body (photos) goes as it is: the browser writes the multipart Content-Type and boundary.
  const form = isFormData(init.body);
  const early = method === 'GET' && init.body === undefined && !init.headers ? takeEarly(path) : undefined;
  try {
    res = await (early ?? fetch(path, {
      method,
      credentials: 'same-origin',
      headers: {
        Accept: 'application/json',
        ...(init.body !== undefined && !form ? { 'Content-Type': 'application/json' } : {}),
        ...init.headers,
      },
      body: form ? (init.body as FormData) : init.body !== undefined ? JSON.stringify(init.body) : undefined,
    }));
  } catch {
    noteReached(false, ping);
    throw new ApiError(0, 'offline', 'No connection to Trimout. Check your signal and try again.');
  }
  noteReached(true);
  if (!res.ok) throw await toError(res);
  const etag = res.headers.get('ETag');
  if (res.status === 204) return { data: undefined as T, etag };
  return { data: (await res.json()) as T, etag };
}

/**
 * A GET the page started before the app's scripts ran (public/early-session.js), handed over once:
 * the second ask of the same path goes to the network as usual.
 */
export function takeEarly(path: string): Promise<Response> | undefined {
  const early = (globalThis as { __trimoutEarly?: Record<string, Promise<Response> | undefined> }).__trimoutEarly;
  const started = early?.[path];
  if (early && started) delete early[path];
  return started;
}

/** Asked every 15 s while the server is unreachable (components/api/reach.ts): any answer will do. */
function ping(): Promise<Response> {
  return fetch('/api/health', { method: 'GET', credentials: 'same-origin' });
}

export function apiGet<T>(path: string): Promise<T> {
  return request<T>('GET', path);
}

/** GET of a file the session may see (a photo thumbnail kept on the phone), as a Blob. */
export async function apiGetBlob(path: string): Promise<Blob> {
  let res: Response;
  try {
    res = await fetch(path, { method: 'GET', credentials: 'same-origin' });
  } catch {
    noteReached(false, ping);
    throw new ApiError(0, 'offline', 'No connection to Trimout. Check your signal and try again.');
  }
  noteReached(true);
  if (!res.ok) throw await toError(res);
  return res.blob();
}

/** A 409 (conflict) or 412 (someone changed it first): the screen reloads and says so. */
export function isConflict(err: unknown): err is ApiError {
  return err instanceof ApiError && (err.status === 409 || err.status === 412);
}

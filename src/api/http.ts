import { ApiRequestError, networkError, toApiRequestError } from './errors';

export { ApiRequestError } from './errors';

/** Every API path is relative to this prefix (served by the same origin; Vite proxies it in development). */
export const API_BASE = '/api/v1';

export type QueryValue = string | number | boolean | null | undefined;

export interface RequestOptions {
  /** Query-string parameters; null and undefined are left out. */
  query?: Record<string, QueryValue>;
  signal?: AbortSignal;
  /**
   * Announce a failure in a toast. Defaults to true for changes (POST/PUT/PATCH/DELETE) and false for reads,
   * because views show a failed read inline with a retry.
   */
  notify?: boolean;
  /** Skip the "session ended" handling for a 401 (the sign-in and /me calls expect 401 as an answer). */
  expectUnauthenticated?: boolean;
}

type Method = 'GET' | 'POST' | 'PUT' | 'PATCH' | 'DELETE';

type ErrorReporter = (error: unknown) => void;
type UnauthenticatedHandler = () => void;

let reportError: ErrorReporter = () => {};
let onUnauthenticated: UnauthenticatedHandler = () => {};
let csrfToken: Promise<string> | null = null;

/** Set once by `src/api/error-toast.ts`: the one place where a failed request becomes a toast. */
export function setErrorReporter(reporter: ErrorReporter): void {
  reportError = reporter;
}

/** Set once by the router: what to do when the server says the session is gone. */
export function setUnauthenticatedHandler(handler: UnauthenticatedHandler): void {
  onUnauthenticated = handler;
}

/** Builds the URL of an API path, e.g. for `<img src>` of a frame or a download link. */
export function apiUrl(path: string, query?: Record<string, QueryValue>): string {
  const url = `${API_BASE}${path.startsWith('/') ? path : `/${path}`}`;
  if (!query) return url;
  const params = new URLSearchParams();
  for (const [key, value] of Object.entries(query)) {
    if (value !== null && value !== undefined) params.append(key, String(value));
  }
  const text = params.toString();
  return text ? `${url}?${text}` : url;
}

async function readBody(response: Response): Promise<unknown> {
  if (response.status === 204) return undefined;
  const text = await response.text();
  if (text === '') return undefined;
  try {
    return JSON.parse(text) as unknown;
  } catch {
    return text;
  }
}

async function fetchCsrfToken(): Promise<string> {
  let response: Response;
  try {
    response = await fetch(apiUrl('/auth/csrf'), { credentials: 'same-origin', headers: { Accept: 'application/json' } });
  } catch {
    throw networkError();
  }
  const body = await readBody(response);
  if (!response.ok) throw toApiRequestError(response.status, body);
  const token = (body as { data?: { csrfToken?: unknown } } | undefined)?.data?.csrfToken;
  if (typeof token !== 'string') throw toApiRequestError(500, undefined);
  return token;
}

/**
 * The CSRF token of the current session, fetched once and cached.
 * Uploads through XMLHttpRequest (for progress events) send it as `X-CSRF-Token` too.
 */
export function getCsrfToken(): Promise<string> {
  if (!csrfToken) {
    csrfToken = fetchCsrfToken();
    // A failed fetch must not stay cached: the next call tries again.
    csrfToken.catch(() => {
      csrfToken = null;
    });
  }
  return csrfToken;
}

/** Forget the token. Note: the server regenerates the session at sign-in, sign-up and sign-out, which voids it. */
export function resetCsrfToken(): void {
  csrfToken = null;
}

function buildInit(method: Method, body: unknown, token: string | null, signal?: AbortSignal): RequestInit {
  const headers: Record<string, string> = { Accept: 'application/json' };
  let payload: BodyInit | undefined;
  if (body instanceof FormData) {
    payload = body;
  } else if (body !== undefined) {
    headers['Content-Type'] = 'application/json';
    payload = JSON.stringify(body);
  }
  if (token) headers['X-CSRF-Token'] = token;
  return { method, headers, body: payload, credentials: 'same-origin', signal };
}

async function send<T>(method: Method, path: string, body: unknown, options: RequestOptions, retried: boolean): Promise<T> {
  const changes = method !== 'GET';
  const token = changes ? await getCsrfToken() : null;
  let response: Response;
  try {
    response = await fetch(apiUrl(path, options.query), buildInit(method, body, token, options.signal));
  } catch (cause) {
    if (cause instanceof DOMException && cause.name === 'AbortError') throw cause;
    throw networkError();
  }
  const parsed = await readBody(response);
  if (response.ok) return parsed as T;

  const error = toApiRequestError(response.status, parsed);
  if (error.code === 'CSRF_INVALID' && !retried) {
    // The session may have been renewed since the token was fetched: fetch a fresh one and try once more.
    resetCsrfToken();
    return send<T>(method, path, body, options, true);
  }
  throw error;
}

/**
 * The one fetch wrapper of the client: JSON in and out, same-origin cookies, the CSRF header on changes,
 * and every failure thrown as an ApiRequestError.
 */
export async function request<T>(method: Method, path: string, body?: unknown, options: RequestOptions = {}): Promise<T> {
  try {
    return await send<T>(method, path, body, options, false);
  } catch (error) {
    if (error instanceof ApiRequestError) {
      if (error.code === 'UNAUTHENTICATED' && !options.expectUnauthenticated) {
        resetCsrfToken();
        onUnauthenticated();
      } else if (options.notify ?? method !== 'GET') {
        reportError(error);
      }
    }
    throw error;
  }
}

/** Shorthands; `T` is the whole JSON answer, e.g. `DataResponse<Me>` or `ListResponse<Member>`. */
export const http = {
  get: <T>(path: string, options?: RequestOptions) => request<T>('GET', path, undefined, options),
  post: <T>(path: string, body?: unknown, options?: RequestOptions) => request<T>('POST', path, body, options),
  put: <T>(path: string, body?: unknown, options?: RequestOptions) => request<T>('PUT', path, body, options),
  patch: <T>(path: string, body?: unknown, options?: RequestOptions) => request<T>('PATCH', path, body, options),
  delete: <T = void>(path: string, options?: RequestOptions) => request<T>('DELETE', path, undefined, options),
};

/** True when the error is one the form can show under its inputs. */
export function hasFieldErrors(error: unknown): error is ApiRequestError {
  return error instanceof ApiRequestError && Object.keys(error.fields).length > 0;
}

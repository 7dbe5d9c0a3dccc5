/**
 * The one place the client talks HTTP. Every request goes to the same origin under /api with
 * the session cookie; every state-changing request carries the CSRF token from
 * GET /api/auth/csrf; every error body `{ error: { code, message, fields? } }` becomes an ApiError.
 */
import { csrfResponseSchema } from '@shared/api/auth';
import { apiErrorBodySchema, type FieldErrors } from '@shared/api/errors';

export type { FieldErrors };

/** A failed request: the server's code and message, its field errors, and the HTTP status (0 = no response). */
export class ApiError extends Error {
  override readonly name = 'ApiError';
  constructor(
    readonly code: string,
    message: string,
    readonly status: number,
    readonly fields: FieldErrors = {},
  ) {
    super(message);
  }
}

/** Something that turns untrusted JSON into a typed value (a zod schema fits). */
export interface Parser<T> {
  parse(data: unknown): T;
}

type QueryValue = string | number | boolean | undefined | null;
export interface RequestOptions<T> {
  query?: Record<string, QueryValue>;
  body?: unknown;
  /** Validates the response body; without it the body is trusted as T. */
  schema?: Parser<T>;
  signal?: AbortSignal;
}

type Method = 'GET' | 'POST' | 'PUT' | 'PATCH' | 'DELETE';

const API_BASE = '/api';
let csrfToken: string | null = null;
let onUnauthorized: ((path: string) => void) | null = null;

/** Called when a request other than the auth endpoints gets 401 (the session ended). */
export function setUnauthorizedHandler(handler: ((path: string) => void) | null): void {
  onUnauthorized = handler;
}

/** Forget the CSRF token; the next state-changing request fetches a fresh one (after login/logout the session is regenerated). */
export function resetCsrfToken(): void {
  csrfToken = null;
}

/** Normalise anything thrown into an ApiError, so stores and views handle one shape. */
export function toApiError(e: unknown): ApiError {
  if (e instanceof ApiError) return e;
  if (e instanceof Error) return new ApiError('network', e.message || 'The request failed', 0);
  return new ApiError('unknown', 'The request failed', 0);
}

function buildUrl(path: string, query?: Record<string, QueryValue>): string {
  const params = new URLSearchParams();
  for (const [key, value] of Object.entries(query ?? {})) {
    if (value !== undefined && value !== null) params.set(key, String(value));
  }
  const qs = params.toString();
  return `${API_BASE}${path}${qs ? `?${qs}` : ''}`;
}

/** Build an ApiError from a non-2xx response body (JSON or not). */
export function errorFromBody(status: number, body: unknown, statusText = ''): ApiError {
  const parsed = apiErrorBodySchema.safeParse(body);
  if (parsed.success) {
    const { code, message, fields } = parsed.data.error;
    return new ApiError(code, message, status, fields ?? {});
  }
  return new ApiError(`http-${status}`, statusText || `The server answered ${status}`, status);
}

async function readBody(res: Response): Promise<unknown> {
  if (res.status === 204 || res.status === 205) return undefined;
  const text = await res.text();
  if (!text) return undefined;
  const type = res.headers.get('content-type') ?? '';
  if (type.includes('json')) return JSON.parse(text);
  return text;
}

async function fetchCsrfToken(): Promise<string> {
  const res = await fetch(buildUrl('/auth/csrf'), { credentials: 'same-origin', headers: { Accept: 'application/json' } });
  const body = await readBody(res);
  if (!res.ok) throw errorFromBody(res.status, body, res.statusText);
  const parsed = csrfResponseSchema.safeParse(body);
  if (!parsed.success) throw new ApiError('csrf', 'The server sent no CSRF token', res.status);
  csrfToken = parsed.data.token;
  return parsed.data.token;
}

async function send(method: Method, url: string, body: unknown, signal?: AbortSignal): Promise<Response> {
  const headers: Record<string, string> = { Accept: 'application/json' };
  if (body !== undefined) headers['Content-Type'] = 'application/json';
  if (method !== 'GET') headers['X-CSRF-Token'] = csrfToken ?? (await fetchCsrfToken());
  return fetch(url, {
    method,
    headers,
    credentials: 'same-origin',
    body: body === undefined ? undefined : JSON.stringify(body),
    signal,
  });
}

/** One request; resolves with the (parsed) body, rejects with ApiError. */
export async function request<T>(method: Method, path: string, opts: RequestOptions<T> = {}): Promise<T> {
  const url = buildUrl(path, opts.query);
  let res: Response;
  let body: unknown;
  try {
    res = await send(method, url, opts.body, opts.signal);
    body = await readBody(res);
    // A stale token (session regenerated elsewhere): fetch a fresh one and try once more.
    if (res.status === 403 && method !== 'GET' && isCsrfRefusal(body)) {
      csrfToken = null;
      res = await send(method, url, opts.body, opts.signal);
      body = await readBody(res);
    }
  } catch (e) {
    throw toApiError(e);
  }
  if (!res.ok) {
    if (res.status === 401 && !path.startsWith('/auth/')) onUnauthorized?.(path);
    throw errorFromBody(res.status, body, res.statusText);
  }
  if (!opts.schema) return body as T;
  try {
    return opts.schema.parse(body);
  } catch {
    throw new ApiError('bad-response', `Unexpected response from ${method} ${path}`, res.status);
  }
}

/**
 * Send raw bytes (a file upload, Content-Type application/octet-stream) with the same CSRF
 * header, retry and error handling as `request`; resolves with the parsed JSON answer.
 */
export async function uploadBytes<T>(path: string, bytes: Blob | ArrayBuffer, opts: Omit<RequestOptions<T>, 'body'> = {}): Promise<T> {
  const url = buildUrl(path, opts.query);
  const post = async (): Promise<Response> => fetch(url, {
    method: 'POST',
    headers: {
      Accept: 'application/json',
      'Content-Type': 'application/octet-stream',
      'X-CSRF-Token': csrfToken ?? (await fetchCsrfToken()),
    },
    credentials: 'same-origin',
    body: bytes,
    signal: opts.signal,
  });
  let res: Response;
  let body: unknown;
  try {
    res = await post();
    body = await readBody(res);
    if (res.status === 403 && isCsrfRefusal(body)) {
      csrfToken = null;
      res = await post();
      body = await readBody(res);
    }
  } catch (e) {
    throw toApiError(e);
  }
  if (!res.ok) {
    if (res.status === 401) onUnauthorized?.(path);
    throw errorFromBody(res.status, body, res.statusText);
  }
  if (!opts.schema) return body as T;
  try {
    return opts.schema.parse(body);
  } catch {
    throw new ApiError('bad-response', `Unexpected response from POST ${path}`, res.status);
  }
}

function isCsrfRefusal(body: unknown): boolean {
  return apiErrorBodySchema.safeParse(body).data?.error.code === 'csrf';
}

export const http = {
  get: <T>(path: string, opts?: RequestOptions<T>) => request<T>('GET', path, opts),
  post: <T>(path: string, body?: unknown, opts?: RequestOptions<T>) => request<T>('POST', path, { ...opts, body }),
  put: <T>(path: string, body?: unknown, opts?: RequestOptions<T>) => request<T>('PUT', path, { ...opts, body }),
  patch: <T>(path: string, body?: unknown, opts?: RequestOptions<T>) => request<T>('PATCH', path, { ...opts, body }),
  delete: <T>(path: string, opts?: RequestOptions<T>) => request<T>('DELETE', path, opts),
};

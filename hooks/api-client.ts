// The one way the app talks to the Keel API. Same origin on web, so the session cookie goes along
// by itself (credentials: 'same-origin'); state-changing requests carry the CSRF synchronizer token
// in the x-csrf-token header. Every failure becomes an ApiError carrying the server's
// `{ error: { code, message, details? } }` (shared/errors.ts).
import type { z } from 'zod';
import { csrfResponseSchema } from '@/shared/api/auth';
import { buildPath } from '@/shared/api/common';
import { ENDPOINTS, type EndpointDef, type EndpointKey } from '@/shared/api/endpoints';
import { CSRF_HEADER, errorBodySchema, type ErrorCode, type ErrorDetail } from '@/shared/errors';

/** Codes the client adds for failures that never reached (or never came back from) the server. */
export type ClientErrorCode = 'NETWORK' | 'BAD_RESPONSE';

export class ApiError extends Error {
  readonly code: ErrorCode | ClientErrorCode;
  /** HTTP status; 0 when the request never got an answer. */
  readonly status: number;
  readonly details: ErrorDetail[];

  constructor(code: ErrorCode | ClientErrorCode, message: string, status: number, details: ErrorDetail[] = []) {
    super(message);
    this.name = 'ApiError';
    this.code = code;
    this.status = status;
    this.details = details;
  }

  /** Field messages keyed by dotted path ('' = the whole form), first message per field. */
  fieldErrors(): Record<string, string> {
    const out: Record<string, string> = {};
    for (const d of this.details) if (!(d.path in out)) out[d.path] = d.message;
    return out;
  }
}

export function isApiError(e: unknown): e is ApiError {
  return e instanceof ApiError;
}

/** A message fit to show a person, whatever was thrown. */
export function errorMessage(e: unknown): string {
  if (e instanceof ApiError) return e.message;
  if (e instanceof Error) return e.message;
  return 'Something went wrong.';
}

// Web: same origin (the server serves the app). Native builds set EXPO_PUBLIC_API_URL.
const BASE = (process.env.EXPO_PUBLIC_API_URL ?? '').replace(/\/$/, '');

let csrfToken: string | null = null;
let csrfPending: Promise<string> | null = null;

/** Forget the CSRF token; the session changed (sign-out) and the server issues a new one. */
export function resetCsrfToken(): void {
  csrfToken = null;
  csrfPending = null;
}

/** Sign-in and /me hand back the session's current token; keep it so the next write needs no extra GET. */
export function setCsrfToken(token: string): void {
  csrfToken = token;
}

async function fetchCsrfToken(): Promise<string> {
  if (csrfToken) return csrfToken;
  if (!csrfPending) {
    csrfPending = (async () => {
      const parsed = csrfResponseSchema.safeParse(await request('GET', ENDPOINTS['auth.csrf'].path));
      if (!parsed.success) throw new ApiError('BAD_RESPONSE', 'The server did not return a CSRF token.', 200);
      csrfToken = parsed.data.csrfToken;
      return csrfToken;
    })().finally(() => {
      csrfPending = null;
    });
  }
  return csrfPending;
}

type Method = 'GET' | 'POST' | 'PUT' | 'PATCH' | 'DELETE';

async function request<T>(method: Method, path: string, body?: unknown, headers: Record<string, string> = {}): Promise<T> {
  let res: Response;
  try {
    res = await fetch(`${BASE}${path}`, {
      method,
      credentials: 'same-origin',
      headers: {
        Accept: 'application/json',
        ...(body !== undefined ? { 'Content-Type': 'application/json' } : {}),
        ...headers,
      },
      body: body !== undefined ? JSON.stringify(body) : undefined,
    });
  } catch {
    throw new ApiError('NETWORK', 'Could not reach the Keel server. Check the connection and try again.', 0);
  }
  if (res.status === 204) return undefined as T;
  const text = await res.text();
  let json: unknown = undefined;
  if (text) {
    try {
      json = JSON.parse(text);
    } catch {
      if (!res.ok) throw new ApiError('INTERNAL', `The server answered ${res.status} without a readable error.`, res.status);
      throw new ApiError('BAD_RESPONSE', 'The server sent a response that is not JSON.', res.status);
    }
  }
  if (!res.ok) {
    const parsed = errorBodySchema.safeParse(json);
    if (parsed.success) {
      const { code, message, details } = parsed.data.error;
      throw new ApiError(code, message, res.status, details ?? []);
    }
    throw new ApiError(res.status === 401 ? 'UNAUTHENTICATED' : 'INTERNAL', `The server answered ${res.status}.`, res.status);
  }
  return json as T;
}

export interface ApiOptions<S extends z.ZodType> {
  body?: unknown;
  /** Response schema: the answer is parsed with it, so screens get exactly the shared types. */
  schema?: S;
}

/**
 * Calls the API. GETs go straight out; POST/PUT/PATCH/DELETE first get a CSRF token (cached) and
 * retry once with a fresh token if the server refused the old one (the session may have rotated).
 */
export async function api<S extends z.ZodType = z.ZodType<unknown>>(
  method: Method,
  path: string,
  opts: ApiOptions<S> = {},
): Promise<z.infer<S>> {
  const send = async (): Promise<unknown> => {
    if (method === 'GET') return request('GET', path);
    const token = await fetchCsrfToken();
    return request(method, path, opts.body, { [CSRF_HEADER]: token });
  };
  let raw: unknown;
  try {
    raw = await send();
  } catch (e) {
    if (e instanceof ApiError && e.code === 'CSRF') {
      resetCsrfToken();
      raw = await send();
    } else {
      // The session is gone, and its token with it; the next write fetches a fresh one.
      if (e instanceof ApiError && e.code === 'UNAUTHENTICATED') resetCsrfToken();
      throw e;
    }
  }
  if (!opts.schema) return raw as z.infer<S>;
  const parsed = opts.schema.safeParse(raw);
  if (!parsed.success) {
    const first = parsed.error.issues[0];
    throw new ApiError(
      'BAD_RESPONSE',
      `Unexpected answer from ${path}: ${first ? `${first.path.join('.') || 'body'}: ${first.message}` : 'invalid'}`,
      200,
    );
  }
  return parsed.data;
}

export const apiGet = <S extends z.ZodType>(path: string, schema?: S) => api<S>('GET', path, { schema });
export const apiPost = <S extends z.ZodType>(path: string, body?: unknown, schema?: S) => api<S>('POST', path, { body: body ?? {}, schema });
export const apiPatch = <S extends z.ZodType>(path: string, body: unknown, schema?: S) => api<S>('PATCH', path, { body, schema });
export const apiPut = <S extends z.ZodType>(path: string, body: unknown, schema?: S) => api<S>('PUT', path, { body, schema });
export const apiDelete = <S extends z.ZodType>(path: string, schema?: S) => api<S>('DELETE', path, { schema });

type Endpoints = typeof ENDPOINTS;
export type EndpointResponse<K extends EndpointKey> = z.output<Endpoints[K]['response']>;

export interface EndpointInput {
  /** Values for the path's `:name` parameters. */
  params?: Record<string, string | number>;
  query?: Record<string, string | number | undefined>;
  body?: unknown;
}

/**
 * Calls one entry of the shared API catalogue (shared/api/endpoints.ts): its method and path,
 * and its response schema to parse the answer — so the client cannot drift from the server.
 */
export function callEndpoint<K extends EndpointKey>(key: K, input: EndpointInput = {}): Promise<EndpointResponse<K>> {
  const e: EndpointDef = ENDPOINTS[key];
  let path = buildPath(e.path, input.params ?? {});
  const q = Object.entries(input.query ?? {}).filter(([, v]) => v !== undefined && v !== '');
  if (q.length > 0) path += `?${q.map(([k, v]) => `${encodeURIComponent(k)}=${encodeURIComponent(String(v))}`).join('&')}`;
  const body = e.method === 'GET' || e.method === 'DELETE' ? undefined : (input.body ?? {});
  return api(e.method, path, { body, schema: e.response }) as Promise<EndpointResponse<K>>;
}

/**
 * The one way the client talks to the API: JSON in and out, same-origin cookies, a CSRF token on
 * every non-GET request, and any non-2xx answer turned into an `ApiProblem` (RFC 9457 bodies).
 */

import type { ProblemFieldError } from '../../shared/schemas/problem.ts';

export type { ProblemFieldError };

interface ProblemBody {
  type?: string;
  title?: string;
  status?: number;
  detail?: string;
  errors?: unknown;
}

export class ApiProblem extends Error {
  readonly type: string;
  readonly status: number;
  readonly title: string;
  readonly detail: string | undefined;
  readonly errors: ProblemFieldError[];
  /** From the Retry-After header (seconds), when the server sent one. */
  readonly retryAfterSeconds: number | undefined;

  constructor(init: { status: number; title: string; type?: string; detail?: string; errors?: ProblemFieldError[]; retryAfterSeconds?: number }) {
    super(init.detail ? `${init.title}: ${init.detail}` : init.title);
    this.name = 'ApiProblem';
    this.type = init.type ?? 'about:blank';
    this.status = init.status;
    this.title = init.title;
    this.detail = init.detail;
    this.errors = init.errors ?? [];
    this.retryAfterSeconds = init.retryAfterSeconds;
  }
}

export function isApiProblem(error: unknown): error is ApiProblem {
  return error instanceof ApiProblem;
}

/** Status 0: the request never got an HTTP answer (offline, server down, proxy refused). */
export const networkProblemStatus = 0;

type QueryValue = string | number | boolean | null | undefined;
export type QueryParams = Record<string, QueryValue | readonly QueryValue[]>;

export interface RequestOptions {
  query?: QueryParams;
  body?: unknown;
  signal?: AbortSignal;
  headers?: Record<string, string>;
  /** How to read a 2xx body; JSON unless said otherwise. */
  responseType?: 'json' | 'text' | 'blob';
}

type Method = 'GET' | 'POST' | 'PUT' | 'PATCH' | 'DELETE';

const csrfPath = '/api/auth/csrf';
let csrfToken: Promise<string> | null = null;

/** Forget the CSRF token; the next non-GET request fetches a fresh one. Call after sign-in and sign-out. */
export function resetCsrfToken(): void {
  csrfToken = null;
}

function getCsrfToken(): Promise<string> {
  if (!csrfToken) {
    const pending = send<{ token: string }>('GET', csrfPath, {}).then(({ token }) => token);
    csrfToken = pending;
    pending.catch(() => {
      if (csrfToken === pending) csrfToken = null;
    });
  }
  return csrfToken;
}

export function buildUrl(path: string, query?: QueryParams): string {
  if (!query) return path;
  const params = new URLSearchParams();
  for (const [key, raw] of Object.entries(query)) {
    const values = Array.isArray(raw) ? raw : [raw];
    for (const value of values as QueryValue[]) {
      if (value === undefined || value === null || value === '') continue;
      params.append(key, String(value));
    }
  }
  const search = params.toString();
  if (!search) return path;
  return `${path}${path.includes('?') ? '&' : '?'}${search}`;
}

function parseRetryAfter(header: string | null): number | undefined {
  if (!header) return undefined;
  const seconds = Number(header);
  if (Number.isFinite(seconds)) return Math.max(0, seconds);
  const date = Date.parse(header);
  if (Number.isNaN(date)) return undefined;
  return Math.max(0, Math.round((date - Date.now()) / 1000));
}

function normalizeFieldErrors(raw: unknown): ProblemFieldError[] {
  if (!Array.isArray(raw)) return [];
  const out: ProblemFieldError[] = [];
  for (const item of raw) {
    if (!item || typeof item !== 'object') continue;
    const entry = item as Record<string, unknown>;
    const path = Array.isArray(entry.path) ? entry.path.join('.') : typeof entry.path === 'string' || typeof entry.path === 'number' ? String(entry.path) : '';
    const message = typeof entry.message === 'string' ? entry.message : 'Check this value';
    const error: ProblemFieldError = { path, message };
    if (typeof entry.row === 'number') error.row = entry.row;
    if (typeof entry.column === 'string' || typeof entry.column === 'number') error.column = String(entry.column);
    out.push(error);
  }
  return out;
}

async function problemFrom(response: Response): Promise<ApiProblem> {
  let body: ProblemBody = {};
  const type = response.headers.get('content-type') ?? '';
  if (type.includes('json')) {
    try {
      body = ((await response.json()) as ProblemBody | null) ?? {};
    } catch {
      body = {};
    }
  }
  const init: ConstructorParameters<typeof ApiProblem>[0] = {
    status: response.status,
    title: body.title || response.statusText || `Request failed (${response.status})`,
    errors: normalizeFieldErrors(body.errors),
  };
  if (body.type) init.type = body.type;
  if (body.detail) init.detail = body.detail;
  const retryAfter = parseRetryAfter(response.headers.get('retry-after'));
  if (retryAfter !== undefined) init.retryAfterSeconds = retryAfter;
  return new ApiProblem(init);
}

async function send<T>(method: Method, path: string, options: RequestOptions, csrf?: string): Promise<T> {
  const headers: Record<string, string> = { Accept: 'application/json, application/problem+json', ...options.headers };
  let body: BodyInit | undefined;
  if (options.body instanceof FormData || options.body instanceof Blob) {
    body = options.body;
  } else if (options.body !== undefined) {
    headers['Content-Type'] = 'application/json';
    body = JSON.stringify(options.body);
  }
  if (csrf) headers['X-CSRF-Token'] = csrf;

  const init: RequestInit = { method, headers, credentials: 'same-origin' };
  if (body !== undefined) init.body = body;
  if (options.signal) init.signal = options.signal;

  let response: Response;
  try {
    response = await fetch(buildUrl(path, options.query), init);
  } catch (error) {
    if (options.signal?.aborted || (error instanceof DOMException && error.name === 'AbortError')) throw error;
    throw new ApiProblem({
      status: networkProblemStatus,
      title: "Can't reach the server",
      detail: 'Check your connection and try again.',
    });
  }

  if (!response.ok) throw await problemFrom(response);
  if (response.status === 204 || response.status === 205) return undefined as T;
  if (options.responseType === 'blob') return (await response.blob()) as T;
  if (options.responseType === 'text') return (await response.text()) as T;
  const text = await response.text();
  return (text ? JSON.parse(text) : undefined) as T;
}

function isCsrfProblem(problem: ApiProblem): boolean {
  return problem.status === 403 && /csrf/i.test(problem.title);
}

async function request<T>(method: Method, path: string, options: RequestOptions = {}): Promise<T> {
  if (method === 'GET') return send<T>(method, path, options);
  try {
    return await send<T>(method, path, options, await getCsrfToken());
  } catch (error) {
    // The session (and with it the token) may have been renewed server-side: fetch a new one, retry once.
    if (!isApiProblem(error) || !isCsrfProblem(error)) throw error;
    resetCsrfToken();
    return send<T>(method, path, options, await getCsrfToken());
  }
}

export const api = {
  get: <T>(path: string, options?: Omit<RequestOptions, 'body'>) => request<T>('GET', path, options),
  post: <T>(path: string, body?: unknown, options?: RequestOptions) => request<T>('POST', path, { ...options, body }),
  put: <T>(path: string, body?: unknown, options?: RequestOptions) => request<T>('PUT', path, { ...options, body }),
  patch: <T>(path: string, body?: unknown, options?: RequestOptions) => request<T>('PATCH', path, { ...options, body }),
  delete: <T>(path: string, options?: RequestOptions) => request<T>('DELETE', path, options),
};

/** A sentence for people, from whatever a request threw. */
export function problemMessage(error: unknown, fallback = 'Something went wrong. Try again.'): string {
  if (isApiProblem(error)) return error.detail ?? error.title;
  if (error instanceof Error && error.message) return error.message;
  return fallback;
}

// Fetch wrapper for the Fluxwright API: same origin by default, EXPO_PUBLIC_API_URL to point
// elsewhere; attaches the session's bearer token and turns the API error shape into ApiError.

export interface ApiErrorDetail {
  path?: string | (string | number)[];
  message: string;
}

export class ApiError extends Error {
  readonly status: number;
  readonly code: string;
  readonly details?: unknown;

  constructor(status: number, code: string, message: string, details?: unknown) {
    super(message);
    this.name = 'ApiError';
    this.status = status;
    this.code = code;
    this.details = details;
  }

  /** Validation details as "field: message" lines, when the server sent them. */
  get fieldMessages(): string[] {
    if (!Array.isArray(this.details)) return [];
    return (this.details as ApiErrorDetail[])
      .filter((d) => d && typeof d.message === 'string')
      .map((d) => {
        const path = Array.isArray(d.path) ? d.path.join('.') : d.path;
        return path ? `${path}: ${d.message}` : d.message;
      });
  }
}

export function apiBaseUrl(): string {
  const fromEnv = process.env.EXPO_PUBLIC_API_URL;
  return typeof fromEnv === 'string' ? fromEnv.replace(/\/+$/, '') : '';
}

// The session provider registers how to read the current token and what to do on a 401,
// so query hooks do not have to thread the token through every call.
let tokenSource: () => string | null = () => null;
let onUnauthenticated: () => void = () => {};

export function configureHttp(opts: { getToken: () => string | null; onUnauthenticated: () => void }): void {
  tokenSource = opts.getToken;
  onUnauthenticated = opts.onUnauthenticated;
}

export interface RequestOptions {
  method?: 'GET' | 'POST' | 'PATCH' | 'PUT' | 'DELETE';
  body?: unknown;
  query?: Record<string, string | number | undefined | null>;
  /** Override the session token (e.g. an explicit API token); null sends no Authorization header. */
  token?: string | null;
  signal?: AbortSignal;
}

function buildUrl(path: string, query?: RequestOptions['query']): string {
  let url = apiBaseUrl() + path;
  if (query) {
    const params = new URLSearchParams();
    for (const [k, v] of Object.entries(query)) {
      if (v !== undefined && v !== null && v !== '') params.set(k, String(v));
    }
    const qs = params.toString();
    if (qs) url += (url.includes('?') ? '&' : '?') + qs;
  }
  return url;
}

export async function apiRequest<T>(path: string, opts: RequestOptions = {}): Promise<T> {
  const headers: Record<string, string> = { Accept: 'application/json' };
  const token = opts.token === undefined ? tokenSource() : opts.token;
  if (token) headers.Authorization = `Bearer ${token}`;
  let body: string | undefined;
  if (opts.body !== undefined) {
    headers['Content-Type'] = 'application/json';
    body = JSON.stringify(opts.body);
  }

  let res: Response;
  try {
    res = await fetch(buildUrl(path, opts.query), { method: opts.method ?? 'GET', headers, body, signal: opts.signal });
  } catch (e) {
    if ((e as Error)?.name === 'AbortError') throw e;
    throw new ApiError(0, 'NETWORK_ERROR', 'Could not reach the Fluxwright server. Check your connection and try again.');
  }

  if (res.status === 204) return undefined as T;
  const text = await res.text();
  let json: unknown = undefined;
  if (text) {
    try {
      json = JSON.parse(text);
    } catch {
      json = undefined;
    }
  }

  if (!res.ok) {
    const err = (json as { error?: { code?: string; message?: string; details?: unknown } } | undefined)?.error;
    const apiErr = new ApiError(
      res.status,
      err?.code ?? `HTTP_${res.status}`,
      err?.message ?? `The server answered ${res.status} ${res.statusText || ''}`.trim(),
      err?.details,
    );
    // A token the server no longer accepts ends the session (only for the session's own token).
    if (res.status === 401 && opts.token === undefined && token) onUnauthenticated();
    throw apiErr;
  }
  if (json === undefined) {
    throw new ApiError(res.status, 'BAD_RESPONSE', `Expected JSON from ${path} but got ${text ? 'non-JSON text' : 'an empty body'}.`);
  }
  return json as T;
}

export const http = {
  get: <T>(path: string, query?: RequestOptions['query'], opts?: Omit<RequestOptions, 'query' | 'method'>) =>
    apiRequest<T>(path, { ...opts, query, method: 'GET' }),
  post: <T>(path: string, body?: unknown, opts?: Omit<RequestOptions, 'body' | 'method'>) =>
    apiRequest<T>(path, { ...opts, body: body ?? {}, method: 'POST' }),
  patch: <T>(path: string, body: unknown) => apiRequest<T>(path, { body, method: 'PATCH' }),
  del: <T = void>(path: string) => apiRequest<T>(path, { method: 'DELETE' }),
};

/** A short human message for any thrown value. */
export function errorMessage(e: unknown): string {
  if (e instanceof ApiError) {
    const fields = e.fieldMessages;
    return fields.length ? `${e.message} (${fields.join('; ')})` : e.message;
  }
  if (e instanceof Error) return e.message;
  return 'Something went wrong.';
}

import type { ApiError, ErrorCode } from '@shared/protocol/ack';

/** Codes a failure can carry: the server's, plus `network` when no answer arrived at all. */
export type FailureCode = ErrorCode | 'network';

/** Words for answers that arrive without the server's JSON error body (a proxy page, a crash, no network). */
const FALLBACK_MESSAGES: Record<FailureCode, string> = {
  'bad-input': 'Some of what you entered needs another look.',
  unauthenticated: 'Please sign in again.',
  forbidden: 'Your role does not allow that.',
  'not-found': 'That was not found. It may have been removed.',
  conflict: 'That clashes with a change someone else made. Reload and try again.',
  'too-many-requests': 'Too many tries in a short time. Wait a minute, then try again.',
  refused: 'The server refused that.',
  internal: 'The server had a problem. Try again in a moment.',
  unavailable: 'The server is briefly out of reach of its records. Nothing was done; try again in a moment.',
  network: 'Railcall cannot reach the server. Check the Wi-Fi or network, then try again.',
};

const STATUS_CODES: Record<number, ErrorCode> = {
  400: 'bad-input',
  401: 'unauthenticated',
  403: 'forbidden',
  404: 'not-found',
  409: 'conflict',
  422: 'bad-input',
  429: 'too-many-requests',
  503: 'unavailable',
};

/** A request that did not succeed; `message` is written for the person and safe to show. */
export class ApiFailure extends Error {
  override readonly name = 'ApiFailure';
  constructor(
    /** HTTP status, or 0 when no answer arrived. */
    readonly status: number,
    readonly code: FailureCode,
    message: string,
    /** Field-level problems for bad-input, keyed by field name. */
    readonly fields: Record<string, string[]> = {},
  ) {
    super(message);
  }

  /** The first problem reported for one field, if any. */
  fieldError(field: string): string | undefined {
    return this.fields[field]?.[0];
  }
}

/** Turns anything thrown into words for the person. */
export function failureMessage(error: unknown): string {
  if (error instanceof ApiFailure) return error.message;
  return FALLBACK_MESSAGES.internal;
}

function isApiError(value: unknown): value is ApiError {
  if (typeof value !== 'object' || value === null) return false;
  const { code, message } = value as Record<string, unknown>;
  return typeof code === 'string' && typeof message === 'string';
}

/** Builds the failure for a non-2xx answer from its status and (maybe) JSON body. */
export function failureFromAnswer(status: number, body: unknown): ApiFailure {
  const error = typeof body === 'object' && body !== null ? (body as { error?: unknown }).error : undefined;
  const fallbackCode: ErrorCode = STATUS_CODES[status] ?? 'internal';
  if (isApiError(error)) {
    const fields = typeof error.fields === 'object' && error.fields !== null ? error.fields : {};
    return new ApiFailure(status, error.code, error.message, fields);
  }
  return new ApiFailure(status, fallbackCode, FALLBACK_MESSAGES[fallbackCode]);
}

export interface RequestOptions {
  method?: 'GET' | 'POST' | 'PUT' | 'PATCH' | 'DELETE';
  /** Sent as JSON. */
  body?: unknown;
  query?: Record<string, string | number | boolean | undefined>;
  signal?: AbortSignal;
}

export interface HttpClient {
  request<T>(path: string, options?: RequestOptions): Promise<T>;
  get<T>(path: string, options?: Omit<RequestOptions, 'method' | 'body'>): Promise<T>;
  post<T>(path: string, body?: unknown, options?: Omit<RequestOptions, 'method' | 'body'>): Promise<T>;
  put<T>(path: string, body?: unknown, options?: Omit<RequestOptions, 'method' | 'body'>): Promise<T>;
  del<T>(path: string, options?: Omit<RequestOptions, 'method' | 'body'>): Promise<T>;
}

export interface HttpClientOptions {
  /** Prefix for every path; empty (same origin) in the app, a test server's origin in tests. */
  baseUrl?: string;
  fetch?: typeof globalThis.fetch;
}

function withQuery(path: string, query: RequestOptions['query']): string {
  if (!query) return path;
  const params = new URLSearchParams();
  for (const [key, value] of Object.entries(query)) {
    if (value !== undefined) params.set(key, String(value));
  }
  const text = params.toString();
  return text ? `${path}${path.includes('?') ? '&' : '?'}${text}` : path;
}

/** A typed JSON client: resolves with the parsed body, rejects with an ApiFailure. */
export function createHttpClient({ baseUrl = '', fetch: fetchImpl }: HttpClientOptions = {}): HttpClient {
  async function request<T>(path: string, { method = 'GET', body, query, signal }: RequestOptions = {}): Promise<T> {
    const headers: Record<string, string> = { Accept: 'application/json' };
    if (body !== undefined) headers['Content-Type'] = 'application/json';
    let response: Response;
    try {
      // Read fetch at call time so a page loaded before the network is up still works.
      response = await (fetchImpl ?? globalThis.fetch)(baseUrl + withQuery(path, query), {
        method,
        headers,
        body: body === undefined ? undefined : JSON.stringify(body),
        credentials: 'same-origin',
        signal,
      });
    } catch (error) {
      if ((error as { name?: string })?.name === 'AbortError') throw error;
      throw new ApiFailure(0, 'network', FALLBACK_MESSAGES.network);
    }

    const text = await response.text().catch(() => '');
    let parsed: unknown;
    if (text) {
      try {
        parsed = JSON.parse(text);
      } catch {
        parsed = undefined;
      }
    }
    if (!response.ok) throw failureFromAnswer(response.status, parsed);
    if (text && parsed === undefined) {
      throw new ApiFailure(response.status, 'internal', FALLBACK_MESSAGES.internal);
    }
    return parsed as T;
  }

  return {
    request,
    get: (path, options) => request(path, { ...options, method: 'GET' }),
    post: (path, body, options) => request(path, { ...options, method: 'POST', body }),
    put: (path, body, options) => request(path, { ...options, method: 'PUT', body }),
    del: (path, options) => request(path, { ...options, method: 'DELETE' }),
  };
}

/** The app's client: same origin, so the session cookie goes along. */
export const http = createHttpClient();

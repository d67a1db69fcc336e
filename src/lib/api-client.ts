import { env } from '@/config/env';

export type FieldErrors = Record<string, string>;

export class ApiError extends Error {
  readonly status: number;
  readonly details: FieldErrors;

  constructor(status: number, message: string, details: FieldErrors = {}) {
    super(message);
    this.name = 'ApiError';
    this.status = status;
    this.details = details;
  }
}

export function isApiError(error: unknown, status?: number): error is ApiError {
  return error instanceof ApiError && (status === undefined || error.status === status);
}

type Method = 'GET' | 'POST' | 'PATCH' | 'PUT' | 'DELETE';
type QueryValue = string | number | boolean | null | undefined;

interface RequestOptions {
  body?: unknown;
  params?: Record<string, QueryValue>;
  signal?: AbortSignal;
}

let csrfToken: string | null = null;
let csrfRequest: Promise<string> | null = null;

function buildUrl(path: string, params?: Record<string, QueryValue>) {
  const search = new URLSearchParams();
  for (const [key, value] of Object.entries(params ?? {})) {
    if (value !== undefined && value !== null && value !== '') search.set(key, String(value));
  }
  const query = search.toString();
  return `${env.API_URL}${path}${query ? `?${query}` : ''}`;
}

/** Same-origin URL of an API resource, for `<img src>` and download links. */
export function apiUrl(path: string): string {
  return buildUrl(path);
}

async function readBody(response: Response): Promise<unknown> {
  if (response.status === 204) return undefined;
  const text = await response.text();
  if (!text) return undefined;
  try {
    return JSON.parse(text);
  } catch {
    return undefined;
  }
}

function asRecord(value: unknown): Record<string, unknown> {
  return value && typeof value === 'object' ? (value as Record<string, unknown>) : {};
}

function refreshCsrfToken(): Promise<string> {
  csrfRequest ??= send<{ csrfToken: string }>('GET', '/auth/csrf', {}, true)
    .then(({ csrfToken: token }) => {
      csrfToken = token;
      return token;
    })
    .finally(() => {
      csrfRequest = null;
    });
  return csrfRequest;
}

async function send<T>(method: Method, path: string, options: RequestOptions, retried = false): Promise<T> {
  const headers: Record<string, string> = { Accept: 'application/json' };
  const isForm = options.body instanceof FormData;
  if (options.body !== undefined && !isForm) headers['Content-Type'] = 'application/json';
  if (method !== 'GET') headers['x-csrf-token'] = csrfToken ?? (await refreshCsrfToken());

  let response: Response;
  try {
    response = await fetch(buildUrl(path, options.params), {
      method,
      headers,
      body: options.body === undefined ? undefined : isForm ? (options.body as FormData) : JSON.stringify(options.body),
      credentials: 'same-origin',
      signal: options.signal,
    });
  } catch (error) {
    if (error instanceof DOMException && error.name === 'AbortError') throw error;
    throw new ApiError(0, 'Cannot reach the Phasewright server — check your connection and try again');
  }

  const payload = asRecord(await readBody(response));
  if (typeof payload.csrfToken === 'string') csrfToken = payload.csrfToken;

  if (!response.ok) {
    const message = typeof payload.error === 'string' ? payload.error : `The server answered ${response.status}`;
    if (method !== 'GET' && response.status === 403 && /csrf/i.test(message) && !retried) {
      csrfToken = null;
      await refreshCsrfToken();
      return send<T>(method, path, options, true);
    }
    const details: FieldErrors = {};
    for (const [field, text] of Object.entries(asRecord(payload.details))) {
      if (typeof text === 'string') details[field] = text;
    }
    throw new ApiError(response.status, message, details);
  }
  return (response.status === 204 ? undefined : payload) as T;
}

export const api = {
  get: <T>(path: string, options: Omit<RequestOptions, 'body'> = {}) => send<T>('GET', path, options),
  post: <T>(path: string, body?: unknown, options: RequestOptions = {}) => send<T>('POST', path, { ...options, body }),
  /** Multipart upload: the browser sets the boundary header itself. */
  postForm: <T>(path: string, form: FormData, options: Omit<RequestOptions, 'body'> = {}) => send<T>('POST', path, { ...options, body: form }),
  patch: <T>(path: string, body?: unknown, options: RequestOptions = {}) => send<T>('PATCH', path, { ...options, body }),
  put: <T>(path: string, body?: unknown, options: RequestOptions = {}) => send<T>('PUT', path, { ...options, body }),
  delete: <T = void>(path: string, options: RequestOptions = {}) => send<T>('DELETE', path, options),
};

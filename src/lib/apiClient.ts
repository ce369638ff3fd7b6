import { csrfCookieName, csrfHeaderName, teamHeaderName } from '@shared/headers';
import { getCurrentTeamId } from './currentTeam';

export interface FieldIssue {
  path: string;
  message: string;
}

/** A failed API call, carrying the server's human message and any per-field problems. */
export class ApiError extends Error {
  readonly status: number;
  readonly code: string;
  readonly issues: FieldIssue[];

  constructor(status: number, code: string, message: string, issues: FieldIssue[] = []) {
    super(message);
    this.name = 'ApiError';
    this.status = status;
    this.code = code;
    this.issues = issues;
  }

  /** First message per field path, for showing beside form inputs. */
  fieldErrors(): Record<string, string> {
    const byField: Record<string, string> = {};
    for (const issue of this.issues) {
      if (!(issue.path in byField)) byField[issue.path] = issue.message;
    }
    return byField;
  }
}

export function isApiError(error: unknown, status?: number): error is ApiError {
  return error instanceof ApiError && (status === undefined || error.status === status);
}

type Method = 'GET' | 'POST' | 'PATCH' | 'PUT' | 'DELETE';

/**
 * The CSRF header for a write: the value of the readable CSRF cookie the server set at sign-in
 * (double submit; the server refuses cookie-authenticated writes without it). Empty when there is none.
 */
export function csrfHeaders(): Record<string, string> {
  if (typeof document === 'undefined') return {};
  const prefix = `${csrfCookieName}=`;
  const entry = document.cookie.split(';').map((part) => part.trim()).find((part) => part.startsWith(prefix));
  return entry ? { [csrfHeaderName]: decodeURIComponent(entry.slice(prefix.length)) } : {};
}

interface RequestOptions {
  body?: unknown;
  signal?: AbortSignal;
  /** Send no team header, e.g. for public routes or before a team is known. */
  withoutTeam?: boolean;
}

async function request<T>(method: Method, path: string, options: RequestOptions = {}): Promise<T> {
  const headers: Record<string, string> = { Accept: 'application/json' };
  if (options.body !== undefined) headers['Content-Type'] = 'application/json';
  const teamId = options.withoutTeam ? null : getCurrentTeamId();
  if (teamId) headers[teamHeaderName] = teamId;
  if (method !== 'GET') Object.assign(headers, csrfHeaders());

  let response: Response;
  try {
    response = await fetch(path, {
      method,
      headers,
      credentials: 'include',
      body: options.body === undefined ? undefined : JSON.stringify(options.body),
      signal: options.signal,
    });
  } catch (cause) {
    if (cause instanceof DOMException && cause.name === 'AbortError') throw cause;
    throw new ApiError(0, 'network', 'The server cannot be reached. Check your connection and try again.');
  }

  if (response.status === 204) return undefined as T;
  const text = await response.text();
  let payload: unknown = undefined;
  if (text) {
    try {
      payload = JSON.parse(text);
    } catch {
      payload = undefined;
    }
  }

  if (!response.ok) {
    // The schema, and zod with it, loads with the first error answer instead of with the sign-in page.
    const { apiErrorSchema } = await import('@shared/api');
    const parsed = apiErrorSchema.safeParse(payload);
    if (parsed.success) {
      const { code, message, issues } = parsed.data.error;
      throw new ApiError(response.status, code, message, issues ?? []);
    }
    throw new ApiError(response.status, 'http_' + response.status, `The server answered ${response.status} ${response.statusText}.`);
  }
  return payload as T;
}

export const api = {
  get: <T>(path: string, options?: Omit<RequestOptions, 'body'>) => request<T>('GET', path, options),
  post: <T>(path: string, body?: unknown, options?: Omit<RequestOptions, 'body'>) =>
    request<T>('POST', path, { ...options, body }),
  patch: <T>(path: string, body?: unknown, options?: Omit<RequestOptions, 'body'>) =>
    request<T>('PATCH', path, { ...options, body }),
  delete: <T = void>(path: string, options?: Omit<RequestOptions, 'body'>) => request<T>('DELETE', path, options),
};

import { csrfCookieName, csrfHeaderName, teamHeaderName } from '@shared/headers';
import { getCurrentTeamId } from './currentTeam';
import { attachmentName, saveBlob } from './download';

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

/** The headers every call sends: the answer it takes, the current team (unless asked not to), CSRF on writes. */
function headersFor(method: Method, options: { withoutTeam?: boolean }, accept: string | null = 'application/json'): Record<string, string> {
  const headers: Record<string, string> = accept ? { Accept: accept } : {};
  const teamId = options.withoutTeam ? null : getCurrentTeamId();
  if (teamId) headers[teamHeaderName] = teamId;
  if (method !== 'GET') Object.assign(headers, csrfHeaders());
  return headers;
}

/** fetch with cookies; a request that never reached the server becomes one plain ApiError. */
async function send(path: string, init: RequestInit): Promise<Response> {
  try {
    return await fetch(path, { ...init, credentials: 'include' });
  } catch (cause) {
    if (cause instanceof DOMException && cause.name === 'AbortError') throw cause;
    throw new ApiError(0, 'network', 'The server cannot be reached. Check your connection and try again.');
  }
}

function parseJson(text: string): unknown {
  if (!text) return undefined;
  try {
    return JSON.parse(text);
  } catch {
    return undefined;
  }
}

/** The server's error answer as an ApiError (its code, message and field issues), else the status line. */
async function failure(response: Response, payload: unknown): Promise<ApiError> {
  // The schema, and zod with it, loads with the first error answer instead of with the sign-in page.
  const { apiErrorSchema } = await import('@shared/api');
  const parsed = apiErrorSchema.safeParse(payload);
  if (parsed.success) {
    const { code, message, issues } = parsed.data.error;
    return new ApiError(response.status, code, message, issues ?? []);
  }
  return new ApiError(response.status, 'http_' + response.status, `The server answered ${response.status} ${response.statusText}.`);
}

async function answerOf<T>(response: Response): Promise<T> {
  if (response.status === 204) return undefined as T;
  const payload = parseJson(await response.text());
  if (!response.ok) throw await failure(response, payload);
  return payload as T;
}

async function request<T>(method: Method, path: string, options: RequestOptions = {}): Promise<T> {
  const headers = headersFor(method, options);
  if (options.body !== undefined) headers['Content-Type'] = 'application/json';
  const response = await send(path, {
    method,
    headers,
    body: options.body === undefined ? undefined : JSON.stringify(options.body),
    signal: options.signal,
  });
  return answerOf<T>(response);
}

/**
 * Posts multipart/form-data (a file and its fields); the browser sets the content type with its
 * boundary. Errors keep the server's shape, so row/column problems of a file arrive as `issues`.
 */
async function upload<T>(path: string, form: FormData, options: Omit<RequestOptions, 'body'> = {}): Promise<T> {
  const response = await send(path, { method: 'POST', headers: headersFor('POST', options), body: form, signal: options.signal });
  return answerOf<T>(response);
}

/**
 * Downloads a file of the API. Fetched (not a bare link) so the current team's header goes with it,
 * then handed to the browser as a file with the name the server gives (else `fallbackName`).
 */
async function download(path: string, fallbackName: string, options: Omit<RequestOptions, 'body'> = {}): Promise<void> {
  // A file of any type: no Accept header.
  const response = await send(path, { headers: headersFor('GET', options, null), signal: options.signal });
  if (!response.ok) {
    const server = await failure(response, parseJson(await response.text()));
    const message = server.code.startsWith('http_') ? `The download failed (${response.status} ${response.statusText}).` : server.message;
    throw new ApiError(response.status, 'download_failed', message);
  }
  saveBlob(await response.blob(), attachmentName(response.headers.get('content-disposition'), fallbackName));
}

export const api = {
  get: <T>(path: string, options?: Omit<RequestOptions, 'body'>) => request<T>('GET', path, options),
  post: <T>(path: string, body?: unknown, options?: Omit<RequestOptions, 'body'>) =>
    request<T>('POST', path, { ...options, body }),
  patch: <T>(path: string, body?: unknown, options?: Omit<RequestOptions, 'body'>) =>
    request<T>('PATCH', path, { ...options, body }),
  delete: <T = void>(path: string, options?: Omit<RequestOptions, 'body'>) => request<T>('DELETE', path, options),
  upload,
  download,
};

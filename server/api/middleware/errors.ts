import type { ErrorRequestHandler, RequestHandler } from 'express';
import { ZodError } from 'zod';
import type { ApiError } from '@shared/api';
import { HttpError } from '../errors';
import { redactUrl } from './requestLog';

function send(res: Parameters<RequestHandler>[1], status: number, error: ApiError['error']): void {
  res.status(status).json({ error } satisfies ApiError);
}

export const apiNotFound: RequestHandler = (req, res) => {
  send(res, 404, { code: 'not_found', message: `No API route ${req.method} ${req.originalUrl.split('?')[0]}.` });
};

/** The one place errors become responses; stack traces go to the log, never to the client. */
export const errorHandler: ErrorRequestHandler = (err, req, res, _next) => {
  if (res.headersSent) return;
  if (err instanceof HttpError) return send(res, err.status, { code: err.code, message: err.message, ...(err.issues ? { issues: err.issues } : {}) });
  if (err instanceof ZodError) {
    const issues = err.issues.map((issue) => ({ path: issue.path.map(String).join('.'), message: issue.message }));
    const first = issues[0];
    const message = first ? (first.path ? `${first.path}: ${first.message}` : first.message) : 'Invalid request.';
    return send(res, 400, { code: 'validation_failed', message, issues });
  }
  // body-parser marks its own errors with `type` and an HTTP status
  const bodyError = err as { type?: string; status?: number };
  if (bodyError.type === 'entity.parse.failed') {
    return send(res, 400, { code: 'invalid_json', message: 'The request body is not valid JSON.' });
  }
  if (bodyError.type === 'entity.too.large') {
    return send(res, 413, { code: 'payload_too_large', message: 'The request body is too large.' });
  }
  if (typeof bodyError.status === 'number' && bodyError.status >= 400 && bodyError.status < 500) {
    return send(res, bodyError.status, { code: 'bad_request', message: 'The request could not be read.' });
  }
  console.error(`[api] ${req.method} ${redactUrl(req.originalUrl)} failed:`, err);
  send(res, 500, { code: 'internal_error', message: 'Something went wrong on the server. The error has been logged.' });
};

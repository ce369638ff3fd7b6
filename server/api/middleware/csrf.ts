import { randomBytes, timingSafeEqual } from 'node:crypto';
import type { Request, RequestHandler, Response } from 'express';
import { csrfCookieName, csrfHeaderName } from '@shared/headers';
import { HttpError } from '../errors';

/**
 * Double-submit CSRF protection for cookie sessions. Another site can make the browser send our
 * session cookie but cannot read our cookies, so it cannot copy the CSRF cookie into the header.
 * SameSite=Lax already stops most cross-site writes; this also covers same-site subdomains and old
 * browsers. Bearer requests are exempt: a browser never attaches that header on its own.
 */
const unsafeMethods = new Set(['POST', 'PUT', 'PATCH', 'DELETE']);

export function isUnsafeMethod(method: string): boolean {
  return unsafeMethods.has(method.toUpperCase());
}

function newCsrfToken(): string {
  return randomBytes(24).toString('base64url');
}

/** Readable by the page's script (not httpOnly) so the client can echo it; lives as long as the session. */
export function setCsrfCookie(res: Response, secure: boolean, maxAgeMs?: number): void {
  res.cookie(csrfCookieName, newCsrfToken(), { httpOnly: false, sameSite: 'lax', secure, path: '/', ...(maxAgeMs ? { maxAge: maxAgeMs } : {}) });
}

/** Gives a browser that has a session cookie but no CSRF cookie (e.g. signed in before this existed) one. */
export function issueCsrfCookie(options: { secure: boolean; sessionCookieName: string }): RequestHandler {
  return (req, res, next) => {
    const cookies = (req.cookies ?? {}) as Record<string, string>;
    if (cookies[options.sessionCookieName] && !cookies[csrfCookieName]) setCsrfCookie(res, options.secure);
    next();
  };
}

function sameToken(a: string, b: string): boolean {
  const left = Buffer.from(a);
  const right = Buffer.from(b);
  return left.length === right.length && timingSafeEqual(left, right);
}

/** Throws 403 unless an unsafe cookie-authenticated request carries the CSRF cookie's value in the header. */
export function checkCsrf(req: Request): void {
  if (!isUnsafeMethod(req.method)) return;
  const cookie = ((req.cookies ?? {}) as Record<string, string>)[csrfCookieName];
  const header = req.get(csrfHeaderName);
  if (!cookie || !header || !sameToken(cookie, header)) {
    throw new HttpError(
      403,
      'csrf_failed',
      `This change was refused: a signed-in browser must send the ${csrfHeaderName} header with the value of the ${csrfCookieName} cookie. Reload the page and try again; scripts should use an API token instead.`,
    );
  }
}

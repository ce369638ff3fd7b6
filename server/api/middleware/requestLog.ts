import type { RequestHandler } from 'express';

/**
 * One line per API request for the operator, with nothing in it that opens an account: no headers,
 * no cookies, no bodies; link tokens in paths and secret-looking query values are replaced.
 */
const secretPathSegments = /\/(invitations|reset-password|password-reset)\/([^/?#]+)/g;
const secretQueryNames = /^(token|password|secret|key|api[_-]?key|access[_-]?token|code|sig|signature|jwt)$/i;
/** base64url or hex runs this long are tokens or hashes, whatever their name */
const longOpaqueValue = /[A-Za-z0-9_-]{32,}(\.[A-Za-z0-9_-]+){0,2}/g;

export function redactUrl(url: string): string {
  const [pathPart, queryPart] = url.split('?', 2) as [string, string | undefined];
  const path = pathPart.replace(secretPathSegments, '/$1/[redacted]').replace(longOpaqueValue, '[redacted]');
  if (queryPart === undefined) return path;
  const query = queryPart
    .split('&')
    .map((pair) => {
      const [name = '', value] = pair.split('=', 2);
      if (value === undefined) return name.replace(longOpaqueValue, '[redacted]');
      return `${name}=${secretQueryNames.test(decodeURIComponent(name)) ? '[redacted]' : value.replace(longOpaqueValue, '[redacted]')}`;
    })
    .join('&');
  return `${path}?${query}`;
}

export function requestLogger(write: (line: string) => void): RequestHandler {
  return (req, res, next) => {
    const started = process.hrtime.bigint();
    res.on('finish', () => {
      const ms = Number(process.hrtime.bigint() - started) / 1e6;
      const via = req.auth?.apiToken ? 'api-token' : req.auth ? (req.get('authorization') ? 'bearer' : 'cookie') : 'none';
      write(
        JSON.stringify({
          at: new Date().toISOString(),
          method: req.method,
          path: redactUrl(req.originalUrl),
          status: res.statusCode,
          ms: Math.round(ms * 10) / 10,
          user: req.auth?.user.id ?? null,
          team: req.team?.id ?? null,
          via,
        }),
      );
    });
    next();
  };
}

import { createHash, randomBytes } from 'node:crypto';

/** A random URL-safe token for e-mailed links; only its hash is stored, so a leaked table opens nothing. */
export function newLinkToken(): { token: string; hash: string } {
  const token = randomBytes(32).toString('base64url');
  return { token, hash: hashLinkToken(token) };
}

export function hashLinkToken(token: string): string {
  return createHash('sha256').update(token).digest('hex');
}

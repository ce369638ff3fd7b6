import type { RequestHandler } from 'express';
import { ipKeyGenerator, rateLimit } from 'express-rate-limit';
import type { ApiError } from '@shared/api';

/**
 * Limits guesses per address and e-mail: an attacker cannot try many passwords for one account, and
 * one busy lab behind a shared address is not locked out by another member's typos. Counts live in
 * the API process's memory, which is enough for one API process.
 */
function limiter(options: { windowMinutes: number; limit: number; countOnlyFailures: boolean; what: string }): RequestHandler {
  return rateLimit({
    windowMs: options.windowMinutes * 60_000,
    limit: options.limit,
    skipSuccessfulRequests: options.countOnlyFailures,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    keyGenerator: (req) => {
      const email = typeof req.body?.email === 'string' ? req.body.email.trim().toLowerCase() : '';
      return `${ipKeyGenerator(req.ip ?? '')}|${email}`;
    },
    handler: (_req, res) => {
      const body: ApiError = {
        error: {
          code: 'rate_limited',
          message: `Too many ${options.what}. Wait ${options.windowMinutes} minutes and try again.`,
        },
      };
      res.status(429).json(body);
    },
  });
}

export const loginRateLimit = () =>
  limiter({ windowMinutes: 15, limit: 10, countOnlyFailures: true, what: 'failed sign-in attempts for this e-mail' });

export const passwordResetRateLimit = () =>
  limiter({ windowMinutes: 15, limit: 5, countOnlyFailures: false, what: 'reset requests for this e-mail' });

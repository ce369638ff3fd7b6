import { Router, type Response } from 'express';
import {
  loginRequestSchema,
  passwordResetConfirmSchema,
  passwordResetRequestSchema,
  signupRequestSchema,
  updateMeRequestSchema,
} from '@shared/auth';
import { csrfCookieName, sessionCookieName } from '@shared/headers';
import type { Config } from '../../config';
import { requireAuth } from '../context';
import { authenticate } from '../middleware/auth';
import { setCsrfCookie } from '../middleware/csrf';
import { loginRateLimit, passwordResetRateLimit } from '../middleware/rate-limit';
import type { AuthService } from '../services/auth';

function cookieOptions(config: Config) {
  return {
    httpOnly: true,
    sameSite: 'lax' as const,
    secure: config.appUrl.startsWith('https:'),
    path: '/',
  };
}

export function authRoutes(deps: { config: Config; auth: AuthService }): Router {
  const { config, auth } = deps;
  const router = Router();
  const setSessionCookie = (res: Response, token: string) => {
    res.cookie(sessionCookieName, token, { ...cookieOptions(config), maxAge: config.sessionTtlSeconds * 1000 });
    setCsrfCookie(res, cookieOptions(config).secure, config.sessionTtlSeconds * 1000);
  };

  router.post('/auth/signup', async (req, res) => {
    const session = await auth.signup(signupRequestSchema.parse(req.body));
    setSessionCookie(res, session.token);
    res.status(201).json(session);
  });

  router.post('/auth/login', loginRateLimit(), async (req, res) => {
    const session = await auth.login(loginRequestSchema.parse(req.body));
    setSessionCookie(res, session.token);
    res.json(session);
  });

  router.post('/auth/logout', authenticate(auth), async (req, res) => {
    await auth.logout(requireAuth(req).sessionId);
    res.clearCookie(sessionCookieName, cookieOptions(config));
    res.clearCookie(csrfCookieName, { ...cookieOptions(config), httpOnly: false });
    res.status(204).end();
  });

  router.post('/auth/password-reset', passwordResetRateLimit(), async (req, res) => {
    await auth.requestPasswordReset(passwordResetRequestSchema.parse(req.body).email);
    res.status(202).json({ ok: true });
  });

  router.post('/auth/password-reset/confirm', async (req, res) => {
    const { token, password } = passwordResetConfirmSchema.parse(req.body);
    await auth.confirmPasswordReset(token, password);
    res.status(204).end();
  });

  router.get('/me', authenticate(auth), async (req, res) => {
    res.json(await auth.me(requireAuth(req).user.id));
  });

  router.patch('/me', authenticate(auth), async (req, res) => {
    res.json(await auth.updateMe(requireAuth(req).user.id, updateMeRequestSchema.parse(req.body)));
  });

  return router;
}

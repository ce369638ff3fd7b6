import { Router } from 'express';
import { createApiTokenRequestSchema } from '@shared/apiTokens';
import { requireAuth } from '../context';
import { authenticate, requireSession } from '../middleware/auth';
import type { ApiTokenService } from '../services/apiTokens';
import type { AuthService } from '../services/auth';

/** The signed-in user's personal API tokens: list, create (secret shown once), revoke. */
export function apiTokenRoutes(deps: { auth: AuthService; apiTokens: ApiTokenService }): Router {
  const { auth, apiTokens } = deps;
  const router = Router();
  router.use('/me/tokens', authenticate(auth), requireSession);

  router.get('/me/tokens', async (req, res) => {
    res.json({ items: await apiTokens.list(requireAuth(req).user.id) });
  });

  router.post('/me/tokens', async (req, res) => {
    res.status(201).json(await apiTokens.create(requireAuth(req).user, createApiTokenRequestSchema.parse(req.body)));
  });

  router.delete('/me/tokens/:id', async (req, res) => {
    await apiTokens.revoke(requireAuth(req).user.id, req.params.id as string);
    res.status(204).end();
  });

  return router;
}

import { Router } from 'express';
import { requireAuth } from '../context';
import { authenticate } from '../middleware/auth';
import type { AuthService } from '../services/auth';
import type { InvitationService } from '../services/invitations';

/** Invitation links as the invited person sees them: a public preview, then acceptance once signed in. */
export function invitationRoutes(deps: { auth: AuthService; invitations: InvitationService }): Router {
  const { auth, invitations } = deps;
  const router = Router();

  router.get('/invitations/:token', async (req, res) => {
    res.json(await invitations.preview(req.params.token));
  });

  router.post('/invitations/:token/accept', authenticate(auth), async (req, res) => {
    res.json(await invitations.accept(req.params.token as string, requireAuth(req).user));
  });

  return router;
}

import { Router } from 'express';
import { requireTeam } from '../context';
import { authenticate, currentTeam, requirePermission } from '../middleware/auth';
import type { AuthService } from '../services/auth';
import type { OutboxService } from '../services/outbox';
import type { TeamService } from '../services/team';

/** Development only: the mail the app "sent", so invitations and resets can be followed without SMTP. */
export function outboxRoutes(deps: { auth: AuthService; teams: TeamService; outbox: OutboxService }): Router {
  const router = Router();
  router.get('/outbox', authenticate(deps.auth), currentTeam(deps.teams), requirePermission('manageTeam'), async (req, res) => {
    res.json({ items: await deps.outbox.listForTeam(requireTeam(req).id) });
  });
  return router;
}

import { Router } from 'express';
import { requireAuth, requireTeam } from '../context';
import { authenticate, currentTeam, requirePermission } from '../middleware/auth';
import type { AuthService } from '../services/auth';
import type { CutRuleService } from '../services/cutRules';
import type { TeamService } from '../services/team';

/** The current team's saved truncation rules. */
export function cutRuleRoutes(deps: { auth: AuthService; teams: TeamService; cutRules: CutRuleService }): Router {
  const { auth, teams, cutRules } = deps;
  const router = Router();
  router.use('/cut-rules', authenticate(auth), currentTeam(teams));

  router.get('/cut-rules', requirePermission('read'), async (req, res) => {
    res.json({ items: await cutRules.list(requireTeam(req)) });
  });

  router.post('/cut-rules', requirePermission('compute'), async (req, res) => {
    res.status(201).json(await cutRules.create(requireTeam(req), requireAuth(req).user, req.body));
  });

  router.delete('/cut-rules/:id', requirePermission('compute'), async (req, res) => {
    await cutRules.remove(requireTeam(req), req.params.id as string);
    res.status(204).end();
  });

  return router;
}

import { Router } from 'express';
import { changeRoleRequestSchema, createInvitationRequestSchema, renameTeamRequestSchema } from '@shared/teams';
import { requireAuth, requireTeam } from '../context';
import { authenticate, currentTeam, requirePermission } from '../middleware/auth';
import type { AuthService } from '../services/auth';
import type { InvitationService } from '../services/invitations';
import type { TeamService } from '../services/team';

/** The current team (x-tacet-team), its members and its invitations. */
export function teamRoutes(deps: { auth: AuthService; teams: TeamService; invitations: InvitationService }): Router {
  const { auth, teams, invitations } = deps;
  const router = Router();
  router.use('/team', authenticate(auth), currentTeam(teams));

  router.get('/team', requirePermission('read'), (req, res) => {
    res.json(requireTeam(req));
  });

  router.patch('/team', requirePermission('manageTeam'), async (req, res) => {
    res.json(await teams.rename(requireTeam(req), renameTeamRequestSchema.parse(req.body).name));
  });

  router.get('/team/members', requirePermission('read'), async (req, res) => {
    res.json({ items: await teams.listMembers(requireTeam(req).id) });
  });

  router.patch('/team/members/:userId', requirePermission('manageTeam'), async (req, res) => {
    const { role } = changeRoleRequestSchema.parse(req.body);
    res.json(await teams.changeRole(requireTeam(req).id, req.params.userId as string, role));
  });

  router.delete('/team/members/:userId', requirePermission('manageTeam'), async (req, res) => {
    await teams.removeMember(requireTeam(req).id, req.params.userId as string);
    res.status(204).end();
  });

  router.get('/team/invitations', requirePermission('manageTeam'), async (req, res) => {
    res.json({ items: await invitations.list(requireTeam(req).id) });
  });

  router.post('/team/invitations', requirePermission('manageTeam'), async (req, res) => {
    const { email, role } = createInvitationRequestSchema.parse(req.body);
    const inviter = requireAuth(req).user;
    res.status(201).json(await invitations.create(requireTeam(req), inviter, email, role));
  });

  router.delete('/team/invitations/:id', requirePermission('manageTeam'), async (req, res) => {
    await invitations.remove(requireTeam(req).id, req.params.id as string);
    res.status(204).end();
  });

  return router;
}

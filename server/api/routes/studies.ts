import { Router } from 'express';
import { studyExportQuerySchema } from '@shared/exports';
import { listStudiesQuerySchema } from '@shared/studies';
import { requireAuth, requireTeam } from '../context';
import { sendExportFile } from '../exportResponse';
import { authenticate, currentTeam, requirePermission } from '../middleware/auth';
import type { AuthService } from '../services/auth';
import type { StudyService } from '../services/studies';
import type { TeamService } from '../services/team';

/** Scaling studies of the current team; other teams' ids answer 404 like missing ones. */
export function studyRoutes(deps: { auth: AuthService; teams: TeamService; studies: StudyService }): Router {
  const { auth, teams, studies } = deps;
  const router = Router();
  router.use('/studies', authenticate(auth), currentTeam(teams));

  router.post('/studies', requirePermission('compute'), async (req, res) => {
    res.status(202).json(await studies.create(requireTeam(req), requireAuth(req).user, req.body));
  });

  router.get('/studies', requirePermission('read'), async (req, res) => {
    res.json(await studies.list(requireTeam(req), listStudiesQuerySchema.parse(req.query)));
  });

  router.get('/studies/:id', requirePermission('read'), async (req, res) => {
    res.json(await studies.get(requireTeam(req), req.params.id as string));
  });

  router.post('/studies/:id/cancel', requirePermission('compute'), async (req, res) => {
    res.json(await studies.cancel(requireTeam(req), req.params.id as string));
  });

  router.post('/studies/:id/extend', requirePermission('compute'), async (req, res) => {
    res.status(202).json(await studies.extend(requireTeam(req), req.params.id as string, req.body));
  });

  router.post('/studies/:id/retry-failed', requirePermission('compute'), async (req, res) => {
    res.status(202).json(await studies.retryFailedCells(requireTeam(req), req.params.id as string));
  });

  router.post('/studies/:id/cells/:cellId/retry', requirePermission('compute'), async (req, res) => {
    res.status(202).json(await studies.retryCell(requireTeam(req), req.params.id as string, req.params.cellId as string));
  });

  router.post('/studies/:id/cells/:cellId/run', requirePermission('compute'), async (req, res) => {
    res.status(202).json(await studies.cellAsRun(requireTeam(req), requireAuth(req).user, req.params.id as string, req.params.cellId as string, req.body));
  });

  router.delete('/studies/:id', requirePermission('compute'), async (req, res) => {
    await studies.remove(requireTeam(req), req.params.id as string);
    res.status(204).end();
  });

  router.get('/studies/:id/export', requirePermission('read'), async (req, res) => {
    const { format } = studyExportQuerySchema.parse(req.query);
    sendExportFile(res, await studies.exportStudy(requireTeam(req), req.params.id as string, format));
  });

  return router;
}

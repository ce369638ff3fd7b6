import { Router } from 'express';
import { runExportFormats } from '@shared/exports';
import { listRunsQuerySchema } from '@shared/runs';
import { requireAuth, requireTeam } from '../context';
import { sendExportFile } from '../exportResponse';
import { authenticate, currentTeam, requirePermission } from '../middleware/auth';
import type { AuthService } from '../services/auth';
import type { RunService } from '../services/runs';
import type { TeamService } from '../services/team';

/** Vacuum runs of the current team; other teams' ids answer 404 like missing ones. */
export function runRoutes(deps: { auth: AuthService; teams: TeamService; runs: RunService }): Router {
  const { auth, teams, runs } = deps;
  const router = Router();
  router.use('/runs', authenticate(auth), currentTeam(teams));

  router.post('/runs', requirePermission('compute'), async (req, res) => {
    res.status(202).json(await runs.create(requireTeam(req), requireAuth(req).user, req.body));
  });

  router.get('/runs', requirePermission('read'), async (req, res) => {
    res.json(await runs.list(requireTeam(req), listRunsQuerySchema.parse(req.query)));
  });

  router.get('/runs/:id', requirePermission('read'), async (req, res) => {
    res.json(await runs.get(requireTeam(req), req.params.id as string));
  });

  router.post('/runs/:id/cancel', requirePermission('compute'), async (req, res) => {
    res.json(await runs.cancel(requireTeam(req), req.params.id as string));
  });

  router.post('/runs/:id/reanalyse', requirePermission('compute'), async (req, res) => {
    res.status(202).json(await runs.reanalyse(requireTeam(req), requireAuth(req).user, req.params.id as string, req.body ?? {}));
  });

  router.post('/runs/:id/retry', requirePermission('compute'), async (req, res) => {
    res.status(202).json(await runs.retry(requireTeam(req), requireAuth(req).user, req.params.id as string));
  });

  router.post('/runs/:id/reseed', requirePermission('compute'), async (req, res) => {
    res.status(202).json(await runs.reseed(requireTeam(req), requireAuth(req).user, req.params.id as string));
  });

  router.delete('/runs/:id', requirePermission('compute'), async (req, res) => {
    await runs.remove(requireTeam(req), req.params.id as string);
    res.status(204).end();
  });

  router.get('/runs/:id/points', requirePermission('read'), async (req, res) => {
    res.json(await runs.points(requireTeam(req), req.params.id as string));
  });

  // one route per export of shared/exports.ts, at /runs/:id/<format>
  for (const format of runExportFormats) {
    router.get(`/runs/:id/${format}`, requirePermission('read'), async (req, res) => {
      sendExportFile(res, await runs.exportRun(requireTeam(req), req.params.id as string, format));
    });
  }

  return router;
}

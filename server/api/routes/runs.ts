import { Router, type Response } from 'express';
import { listRunsQuerySchema } from '@shared/runs';
import { requireAuth, requireTeam } from '../context';
import { authenticate, currentTeam, requirePermission } from '../middleware/auth';
import type { AuthService } from '../services/auth-service';
import type { RunService } from '../services/run-service';
import type { TeamService } from '../services/team-service';

/** 17 significant digits: enough for every float64 to read back as the same number (IEEE 754 §5.12.2). */
const fullPrecision = (value: number) => value.toPrecision(17);

function sendCsv(res: Response, filename: string, header: string, rows: string[]): void {
  res.set('Content-Type', 'text/csv; charset=utf-8');
  res.attachment(filename);
  res.send([header, ...rows].join('\n') + '\n');
}

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

  router.delete('/runs/:id', requirePermission('compute'), async (req, res) => {
    await runs.remove(requireTeam(req), req.params.id as string);
    res.status(204).end();
  });

  router.get('/runs/:id/points', requirePermission('read'), async (req, res) => {
    const { id: _id, ...points } = await runs.points(requireTeam(req), req.params.id as string);
    res.json(points);
  });

  router.get('/runs/:id/points.csv', requirePermission('read'), async (req, res) => {
    const { id, columns, points } = await runs.points(requireTeam(req), req.params.id as string);
    sendCsv(res, `tacet-run-${id.slice(0, 8)}-points.csv`, columns.join(','), points.map((p) => p.map(fullPrecision).join(',')));
  });

  router.get('/runs/:id/spectrum.csv', requirePermission('read'), async (req, res) => {
    const { id, eigenvalues, continuum, modesKept } = await runs.spectrum(requireTeam(req), req.params.id as string);
    const rows = eigenvalues.map(
      (value, k) => `${k + 1},${fullPrecision(value)},${continuum ? fullPrecision(continuum[k]!) : ''},${k < modesKept ? 1 : 0}`,
    );
    sendCsv(res, `tacet-run-${id.slice(0, 8)}-spectrum.csv`, 'rank,eigenvalue,continuum,kept', rows);
  });

  router.get('/runs/:id/spectrum.json', requirePermission('read'), async (req, res) => {
    const { id: _id, ...spectrum } = await runs.spectrum(requireTeam(req), req.params.id as string);
    res.json(spectrum);
  });

  return router;
}

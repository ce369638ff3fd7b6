import { Router } from 'express';
import type { HealthService } from '../services/health';

export function healthRoutes(deps: { health: HealthService }): Router {
  const router = Router();
  router.get('/health', async (_req, res) => {
    const report = await deps.health.check();
    res.status(report.status === 'ok' ? 200 : 503).json(report);
  });
  return router;
}

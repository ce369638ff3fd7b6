import { Router } from 'express';
import type { EngineLimits } from '@shared/limits';
import { DENSE_SIZE_LIMIT, DENSE_SIZE_LIMITS } from '../../engine/index';

/**
 * GET /api/limits: the dense size limit the server validates against (the engine's limit for the
 * backend it selects here; workers start with the same environment, so they select the same one).
 */
export function limitsRoutes(): Router {
  const router = Router();
  const limits: EngineLimits = {
    dense: {
      maxN: DENSE_SIZE_LIMIT.maxN,
      backend: DENSE_SIZE_LIMIT.backend,
      byBackend: { native: DENSE_SIZE_LIMITS.native, 'ml-matrix': DENSE_SIZE_LIMITS['ml-matrix'] },
      reason: DENSE_SIZE_LIMIT.reason,
    },
  };
  router.get('/limits', (_req, res) => {
    res.json(limits);
  });
  return router;
}

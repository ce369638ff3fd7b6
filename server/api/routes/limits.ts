import { Router } from 'express';
import {
  AUTO_STRUCTURED_FROM,
  engineRuleText,
  STRUCTURED_DIMENSIONS,
  STRUCTURED_MAX_N_2D,
  STRUCTURED_MEMORY_REASON,
  STRUCTURED_TRUNCATIONS,
} from '@shared/engineChoice';
import type { EngineLimits } from '@shared/limits';
import { DENSE_SIZE_LIMIT, DENSE_SIZE_LIMITS } from '../../engine/index';

/**
 * GET /api/limits: the size limits the server validates against — the dense engine's for the backend it
 * selects here (workers start with the same environment, so they select the same one), the structured
 * engine's, and the rule that decides which applies.
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
    structured: {
      maxN: STRUCTURED_MAX_N_2D,
      dimensions: [...STRUCTURED_DIMENSIONS],
      truncations: [...STRUCTURED_TRUNCATIONS],
      autoFrom: AUTO_STRUCTURED_FROM,
      reason: STRUCTURED_MEMORY_REASON,
    },
    rule: engineRuleText,
  };
  router.get('/limits', (_req, res) => {
    res.json(limits);
  });
  return router;
}

import { z } from 'zod';

/** The engines' size limits as a server applies them (GET /api/limits). */
export const engineLimitsSchema = z.object({
  dense: z.object({
    /** largest N the server accepts for runs, studies and imported causal sets on the dense engine */
    maxN: z.number().int().positive(),
    /** the linear-algebra backend the engine selects on this server, which sets maxN */
    backend: z.enum(['native', 'ml-matrix']),
    /** the limit of each backend, so a client can say what the other one would allow */
    byBackend: z.object({ native: z.number().int().positive(), 'ml-matrix': z.number().int().positive() }),
    /** why there is a limit: memory of the N × N matrices held at once */
    reason: z.string(),
  }),
  structured: z.object({
    /** largest N of a run on the structured engine */
    maxN: z.number().int().positive(),
    /** the dimensions it serves (2D, non-periodic regions) */
    dimensions: z.array(z.union([z.literal(2), z.literal(4)])),
    /** the truncation rules it serves: a cut known before the spectrum */
    truncations: z.array(z.enum(['none', 'sqrtN', 'lambda', 'knee', 'modes'])),
    /** 'auto' picks it from this N on (when it can serve the request) */
    autoFrom: z.number().int().positive(),
    /** what it keeps in memory */
    reason: z.string(),
  }),
  /** the rule 'auto' follows, in words (shared/engineChoice.ts chooseEngine) */
  rule: z.string(),
});
export type EngineLimits = z.infer<typeof engineLimitsSchema>;

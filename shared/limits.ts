import { z } from 'zod';

/** The dense engine's size limits as a server applies them (GET /api/limits). */
export const engineLimitsSchema = z.object({
  dense: z.object({
    /** largest N the server accepts for runs, studies and imported causal sets */
    maxN: z.number().int().positive(),
    /** the linear-algebra backend the engine selects on this server, which sets maxN */
    backend: z.enum(['native', 'ml-matrix']),
    /** the limit of each backend, so a client can say what the other one would allow */
    byBackend: z.object({ native: z.number().int().positive(), 'ml-matrix': z.number().int().positive() }),
    /** why there is a limit: memory of the N × N matrices held at once */
    reason: z.string(),
  }),
});
export type EngineLimits = z.infer<typeof engineLimitsSchema>;

import { z } from 'zod';

/** Every error the API sends has this shape; `issues` lists field problems from zod. */
export const apiErrorSchema = z.object({
  error: z.object({
    code: z.string(),
    message: z.string(),
    issues: z.array(z.object({ path: z.string(), message: z.string() })).optional(),
  }),
});
export type ApiError = z.infer<typeof apiErrorSchema>;

export const healthResponseSchema = z.object({
  status: z.enum(['ok', 'degraded']),
  database: z.object({ ok: z.boolean(), message: z.string().optional() }),
  redis: z.object({ ok: z.boolean(), message: z.string().optional() }),
  workers: z.number().int(),
  version: z.string(),
});
export type HealthResponse = z.infer<typeof healthResponseSchema>;

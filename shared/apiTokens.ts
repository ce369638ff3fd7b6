import { z } from 'zod';

/**
 * Personal API tokens: a script or notebook sends one as `Authorization: Bearer <token>` and acts as
 * its owner in the token's team, with the owner's current role there. The secret is shown once.
 */

/** Every token starts with this, so a leaked one is easy to recognise (and to grep for). */
export const apiTokenPrefix = 'tct_';

export const createApiTokenRequestSchema = z.strictObject({
  name: z.string().trim().min(1, 'Name the token, e.g. after the notebook that uses it.').max(120, 'Use at most 120 characters.'),
  teamId: z.uuid('Choose one of your teams.'),
  /** days until the token stops working; omit for a token that lasts until revoked */
  expiresInDays: z.number().int('Use whole days.').min(1, 'At least one day.').max(3650, 'At most ten years.').optional(),
});
export type CreateApiTokenRequest = z.infer<typeof createApiTokenRequestSchema>;

export const apiTokenSchema = z.object({
  id: z.string(),
  name: z.string(),
  team: z.object({ id: z.string(), name: z.string() }),
  /** the first characters of the secret, to tell tokens apart */
  hint: z.string(),
  createdAt: z.string(),
  expiresAt: z.string().nullable(),
  lastUsedAt: z.string().nullable(),
});
export type ApiToken = z.infer<typeof apiTokenSchema>;

/** Answer of POST /api/me/tokens: the only time the secret is sent. */
export const createdApiTokenSchema = apiTokenSchema.extend({ token: z.string() });
export type CreatedApiToken = z.infer<typeof createdApiTokenSchema>;

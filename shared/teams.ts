import { z } from 'zod';
import { emailSchema } from './auth';
import { roleSchema } from './roles';

export const memberSchema = z.object({
  userId: z.string(),
  email: z.string(),
  name: z.string(),
  role: roleSchema,
  joinedAt: z.string(),
});
export type Member = z.infer<typeof memberSchema>;

export const changeRoleRequestSchema = z.strictObject({ role: roleSchema });

export const createInvitationRequestSchema = z.strictObject({ email: emailSchema, role: roleSchema });
export type CreateInvitationRequest = z.infer<typeof createInvitationRequestSchema>;

export const invitationSchema = z.object({
  id: z.string(),
  email: z.string(),
  role: roleSchema,
  createdAt: z.string(),
  expiresAt: z.string(),
  acceptedAt: z.string().nullable(),
});
export type Invitation = z.infer<typeof invitationSchema>;

/** Public preview of an invitation, shown on the accept page before sign-in. */
export const invitationPreviewSchema = z.object({
  teamName: z.string(),
  email: z.string(),
  role: roleSchema,
  invitedBy: z.string(),
  expired: z.boolean(),
  accepted: z.boolean(),
});
export type InvitationPreview = z.infer<typeof invitationPreviewSchema>;

export const renameTeamRequestSchema = z.strictObject({
  name: z.string().trim().min(1, 'Enter a team name.').max(120, 'Use at most 120 characters.'),
});

export const outboxMessageSchema = z.object({
  id: z.string(),
  to: z.string(),
  subject: z.string(),
  text: z.string(),
  createdAt: z.string(),
});
export type OutboxMessage = z.infer<typeof outboxMessageSchema>;

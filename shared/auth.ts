import { z } from 'zod';
import { roleSchema } from './roles';

/** Password policy shared by sign-up, reset and invitation acceptance. */
export const passwordSchema = z
  .string()
  .min(10, 'Use at least 10 characters.')
  .max(200, 'Use at most 200 characters.')
  .regex(/[A-Za-z]/, 'Include at least one letter.')
  .regex(/[^A-Za-z]/, 'Include at least one digit or symbol.');

export const emailSchema = z.string().trim().toLowerCase().pipe(z.email('Enter a valid e-mail address.').max(254));

export const signupRequestSchema = z.strictObject({
  email: emailSchema,
  password: passwordSchema,
  name: z.string().trim().min(1, 'Enter your name.').max(120),
  /** Name of the team created for the new user; ignored when an invitation token is given. */
  teamName: z.string().trim().min(1).max(120).optional(),
  /** Sign up through an invitation: join that team instead of creating one. */
  invitationToken: z.string().min(10).max(200).optional(),
});
export type SignupRequest = z.infer<typeof signupRequestSchema>;

export const loginRequestSchema = z.strictObject({
  email: emailSchema,
  password: z.string().min(1, 'Enter your password.').max(200),
});
export type LoginRequest = z.infer<typeof loginRequestSchema>;

export const passwordResetRequestSchema = z.strictObject({ email: emailSchema });
export const passwordResetConfirmSchema = z.strictObject({
  token: z.string().min(10).max(200),
  password: passwordSchema,
});

export const userSchema = z.object({
  id: z.string(),
  email: z.string(),
  name: z.string(),
  notifyOnRunDone: z.boolean(),
  notifyOnStudyDone: z.boolean(),
});
export type User = z.infer<typeof userSchema>;

export const membershipSchema = z.object({
  team: z.object({ id: z.string(), name: z.string() }),
  role: roleSchema,
});
export type Membership = z.infer<typeof membershipSchema>;

/** Answer of POST /api/auth/signup and POST /api/auth/login. */
export const sessionResponseSchema = z.object({ token: z.string(), user: userSchema });
export type SessionResponse = z.infer<typeof sessionResponseSchema>;

/** Answer of GET /api/me. */
export const meResponseSchema = z.object({ user: userSchema, memberships: z.array(membershipSchema) });
export type MeResponse = z.infer<typeof meResponseSchema>;

export const updateMeRequestSchema = z.strictObject({
  name: z.string().trim().min(1, 'Enter your name.').max(120, 'Use at most 120 characters.').optional(),
  notifyOnRunDone: z.boolean().optional(),
  notifyOnStudyDone: z.boolean().optional(),
});

import { EntitySchema } from 'typeorm';
import type { Role } from '@shared/roles';

/**
 * Row types and TypeORM EntitySchemas (no decorators). Column names are snake_case in the database;
 * the tables themselves are created by the hand-written migrations in ./migrations, never by
 * `synchronize`.
 */

export interface UserRow {
  id: string;
  email: string;
  name: string;
  passwordHash: string;
  notifyOnRunDone: boolean;
  notifyOnStudyDone: boolean;
  createdAt: Date;
}

export interface TeamRow {
  id: string;
  name: string;
  createdAt: Date;
}

export interface MembershipRow {
  id: string;
  userId: string;
  teamId: string;
  role: Role;
  createdAt: Date;
}

export interface SessionRow {
  id: string;
  userId: string;
  createdAt: Date;
  expiresAt: Date;
  revokedAt: Date | null;
}

export interface InvitationRow {
  id: string;
  teamId: string;
  email: string;
  role: Role;
  tokenHash: string;
  invitedByUserId: string;
  createdAt: Date;
  expiresAt: Date;
  acceptedAt: Date | null;
  acceptedByUserId: string | null;
}

export interface PasswordResetRow {
  id: string;
  userId: string;
  tokenHash: string;
  createdAt: Date;
  expiresAt: Date;
  usedAt: Date | null;
}

export interface OutboxMessageRow {
  id: string;
  teamId: string | null;
  toAddress: string;
  subject: string;
  text: string;
  /** the full message as nodemailer's JSON transport rendered it */
  envelope: Record<string, unknown>;
  createdAt: Date;
}

const id = { type: 'uuid', primary: true, generated: 'uuid' } as const;
const createdAt = { type: 'timestamptz', name: 'created_at', createDate: true } as const;

export const UserEntity = new EntitySchema<UserRow>({
  name: 'User',
  tableName: 'users',
  columns: {
    id,
    email: { type: 'text', unique: true },
    name: { type: 'text' },
    passwordHash: { type: 'text', name: 'password_hash' },
    notifyOnRunDone: { type: 'boolean', name: 'notify_on_run_done', default: true },
    notifyOnStudyDone: { type: 'boolean', name: 'notify_on_study_done', default: true },
    createdAt,
  },
});

export const TeamEntity = new EntitySchema<TeamRow>({
  name: 'Team',
  tableName: 'teams',
  columns: { id, name: { type: 'text' }, createdAt },
});

export const MembershipEntity = new EntitySchema<MembershipRow>({
  name: 'Membership',
  tableName: 'memberships',
  columns: {
    id,
    userId: { type: 'uuid', name: 'user_id' },
    teamId: { type: 'uuid', name: 'team_id' },
    role: { type: 'text' },
    createdAt,
  },
});

export const SessionEntity = new EntitySchema<SessionRow>({
  name: 'Session',
  tableName: 'sessions',
  columns: {
    id,
    userId: { type: 'uuid', name: 'user_id' },
    createdAt,
    expiresAt: { type: 'timestamptz', name: 'expires_at' },
    revokedAt: { type: 'timestamptz', name: 'revoked_at', nullable: true },
  },
});

export const InvitationEntity = new EntitySchema<InvitationRow>({
  name: 'Invitation',
  tableName: 'invitations',
  columns: {
    id,
    teamId: { type: 'uuid', name: 'team_id' },
    email: { type: 'text' },
    role: { type: 'text' },
    tokenHash: { type: 'text', name: 'token_hash', unique: true },
    invitedByUserId: { type: 'uuid', name: 'invited_by_user_id' },
    createdAt,
    expiresAt: { type: 'timestamptz', name: 'expires_at' },
    acceptedAt: { type: 'timestamptz', name: 'accepted_at', nullable: true },
    acceptedByUserId: { type: 'uuid', name: 'accepted_by_user_id', nullable: true },
  },
});

export const PasswordResetEntity = new EntitySchema<PasswordResetRow>({
  name: 'PasswordReset',
  tableName: 'password_resets',
  columns: {
    id,
    userId: { type: 'uuid', name: 'user_id' },
    tokenHash: { type: 'text', name: 'token_hash', unique: true },
    createdAt,
    expiresAt: { type: 'timestamptz', name: 'expires_at' },
    usedAt: { type: 'timestamptz', name: 'used_at', nullable: true },
  },
});

export const OutboxMessageEntity = new EntitySchema<OutboxMessageRow>({
  name: 'OutboxMessage',
  tableName: 'outbox_messages',
  columns: {
    id,
    teamId: { type: 'uuid', name: 'team_id', nullable: true },
    toAddress: { type: 'text', name: 'to_address' },
    subject: { type: 'text' },
    text: { type: 'text' },
    envelope: { type: 'jsonb' },
    createdAt,
  },
});

export const platformEntities = [
  UserEntity,
  TeamEntity,
  MembershipEntity,
  SessionEntity,
  InvitationEntity,
  PasswordResetEntity,
  OutboxMessageEntity,
];

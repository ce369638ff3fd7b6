import { EntitySchema } from 'typeorm';

export interface ApiTokenRow {
  id: string;
  userId: string;
  teamId: string;
  name: string;
  /** SHA-256 (hex) of the secret; the secret itself is never stored */
  tokenHash: string;
  tokenHint: string;
  createdAt: Date;
  expiresAt: Date | null;
  lastUsedAt: Date | null;
  revokedAt: Date | null;
}

export const ApiTokenEntity = new EntitySchema<ApiTokenRow>({
  name: 'ApiToken',
  tableName: 'api_tokens',
  columns: {
    id: { type: 'uuid', primary: true, generated: 'uuid' },
    userId: { type: 'uuid', name: 'user_id' },
    teamId: { type: 'uuid', name: 'team_id' },
    name: { type: 'text' },
    tokenHash: { type: 'text', name: 'token_hash', unique: true },
    tokenHint: { type: 'text', name: 'token_hint' },
    createdAt: { type: 'timestamptz', name: 'created_at', createDate: true },
    expiresAt: { type: 'timestamptz', name: 'expires_at', nullable: true },
    lastUsedAt: { type: 'timestamptz', name: 'last_used_at', nullable: true },
    revokedAt: { type: 'timestamptz', name: 'revoked_at', nullable: true },
  },
});

export const tokenEntities = [ApiTokenEntity];

import type { DataSource } from 'typeorm';
import type { OutboxMessage } from '@shared/teams';
import { listOutboxForTeam } from '../../db/repositories/outbox';

export type OutboxService = ReturnType<typeof createOutboxService>;

export function createOutboxService(deps: { dataSource: DataSource }) {
  return {
    async listForTeam(teamId: string): Promise<OutboxMessage[]> {
      const rows = await listOutboxForTeam(deps.dataSource.manager, teamId);
      return rows.map((r) => ({
        id: r.id,
        to: r.toAddress,
        subject: r.subject,
        text: r.text,
        createdAt: r.createdAt.toISOString(),
      }));
    },
  };
}

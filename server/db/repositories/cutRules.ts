import type { EntityManager } from 'typeorm';
import type { TruncationRule } from '@shared/vacuum';
import { CutRuleEntity, type CutRuleRow } from '../run-entities';
import { changedRows } from './runs';

export type CutRuleWithAuthor = CutRuleRow & { createdByName: string };

export async function listCutRulesOfTeam(m: EntityManager, teamId: string): Promise<CutRuleWithAuthor[]> {
  const rows: { id: string; team_id: string; name: string; rule: TruncationRule; note: string | null; created_by: string; created_at: Date; created_by_name: string }[] =
    await m.query(
      `SELECT c.id, c.team_id, c.name, c.rule, c.note, c.created_by, c.created_at, u.name AS created_by_name
         FROM cut_rules c JOIN users u ON u.id = c.created_by
        WHERE c.team_id = $1
        ORDER BY lower(c.name), c.created_at`,
      [teamId],
    );
  return rows.map((r) => ({
    id: r.id,
    teamId: r.team_id,
    name: r.name,
    rule: r.rule,
    note: r.note,
    createdBy: r.created_by,
    createdAt: r.created_at,
    createdByName: r.created_by_name,
  }));
}

/** Inserts unless the team already has a rule of that name (then null): one statement, no race. */
export async function insertCutRule(
  m: EntityManager,
  values: { teamId: string; name: string; rule: TruncationRule; note: string | null; createdBy: string },
): Promise<CutRuleRow | null> {
  const rows: { id: string }[] = await m.query(
    `INSERT INTO cut_rules (team_id, name, rule, note, created_by) VALUES ($1, $2, $3, $4, $5)
     ON CONFLICT (team_id, name) DO NOTHING RETURNING id`,
    [values.teamId, values.name, JSON.stringify(values.rule), values.note, values.createdBy],
  );
  return rows[0] ? m.findOneBy(CutRuleEntity, { id: rows[0].id }) : null;
}

export async function deleteCutRule(m: EntityManager, teamId: string, id: string): Promise<boolean> {
  return changedRows(m, `DELETE FROM cut_rules WHERE id = $1 AND team_id = $2`, [id, teamId]);
}

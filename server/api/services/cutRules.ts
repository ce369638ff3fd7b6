import type { DataSource } from 'typeorm';
import { createCutRuleRequestSchema, type CutRule } from '@shared/runs';
import * as cutRules from '../../db/repositories/cutRules';
import type { UserRow } from '../../db/entities';
import type { TeamContext } from '../context';
import { conflict, notFound } from '../errors';

const uuidPattern = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

export type CutRuleService = ReturnType<typeof createCutRuleService>;

/** Named truncation rules a team saves once and picks in the run form. */
export function createCutRuleService(deps: { dataSource: DataSource }) {
  const m = deps.dataSource.manager;
  const toCutRule = (row: cutRules.CutRuleWithAuthor): CutRule => ({
    id: row.id,
    name: row.name,
    rule: row.rule,
    note: row.note,
    createdBy: { id: row.createdBy, name: row.createdByName },
    createdAt: row.createdAt.toISOString(),
  });

  return {
    async list(team: TeamContext): Promise<CutRule[]> {
      return (await cutRules.listCutRulesOfTeam(m, team.id)).map(toCutRule);
    },

    async create(team: TeamContext, author: UserRow, body: unknown): Promise<CutRule> {
      const { name, rule, note } = createCutRuleRequestSchema.parse(body);
      const row = await cutRules.insertCutRule(m, { teamId: team.id, name, rule, note: note || null, createdBy: author.id });
      if (!row) throw conflict('name_taken', `This team already has a cut rule named "${name}". Pick another name.`);
      return toCutRule({ ...row, createdByName: author.name });
    },

    async remove(team: TeamContext, id: string): Promise<void> {
      if (!uuidPattern.test(id) || !(await cutRules.deleteCutRule(m, team.id, id.toLowerCase()))) throw notFound('Cut rule not found.');
    },
  };
}

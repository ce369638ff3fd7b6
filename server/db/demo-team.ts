/**
 * The demo team `npm start` signs people into (an invented group). Idempotent — existing users,
 * the team and memberships are found and left as they are; only what is missing is created.
 */
import bcrypt from 'bcryptjs';
import type { DataSource } from 'typeorm';
import type { Role } from '@shared/roles';
import * as teams from './repositories/teams';
import * as users from './repositories/users';

export const demoTeamName = 'Halvorsen Causal Set Group';
export const demoPassword = 'sprinkle-2026';
export const demoUsers: { email: string; name: string; role: Role }[] = [
  { email: 'ingrid.halvorsen@tacet.example', name: 'Ingrid Halvorsen', role: 'owner' },
  { email: 'tomas.okafor@tacet.example', name: 'Tomás Okafor', role: 'researcher' },
  { email: 'mira.castellanos@tacet.example', name: 'Mira Castellanos', role: 'viewer' },
];

export async function seedDemoTeam(dataSource: DataSource, bcryptCost: number): Promise<{ created: string[] }> {
  const created: string[] = [];
  await dataSource.transaction(async (m) => {
    // Serialise concurrent seeders (two `npm start`s at once) so neither creates a second team.
    await m.query(`SELECT pg_advisory_xact_lock(hashtext('tacet-demo-seed'))`);
    const passwordHash = await bcrypt.hash(demoPassword, bcryptCost);
    const rows = [];
    for (const demo of demoUsers) {
      let user = await users.findUserByEmail(m, demo.email);
      if (!user) {
        user = await users.insertUser(m, { email: demo.email, name: demo.name, passwordHash });
        created.push(demo.email);
      }
      rows.push({ demo, user });
    }
    const owner = rows[0]!.user;
    const ownerTeams = await teams.listMembershipsOfUser(m, owner.id);
    let teamId = ownerTeams.find((ms) => ms.teamName === demoTeamName)?.teamId;
    if (!teamId) {
      teamId = (await teams.insertTeam(m, demoTeamName)).id;
      created.push(`team "${demoTeamName}"`);
    }
    for (const { demo, user } of rows) {
      if (!(await teams.findMembership(m, user.id, teamId))) {
        await teams.insertMembership(m, { userId: user.id, teamId, role: demo.role });
      }
    }
  });
  return { created };
}


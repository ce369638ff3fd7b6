/** `tsx server/seed.ts`: adds the demo team to DATABASE_URL if it is missing (see db/demo-team.ts). */
import { loadConfig } from './config';
import { createDataSource } from './db/data-source';
import { seedDemoTeam } from './db/demo-team';

const config = loadConfig();
const dataSource = createDataSource(config.databaseUrl);
try {
  await dataSource.initialize();
  const { created } = await seedDemoTeam(dataSource, config.bcryptCost);
  console.log(created.length ? `Seeded demo data: ${created.join(', ')}` : 'Demo team already present.');
} catch (error) {
  console.error(`Seeding failed: ${(error as Error).message}`);
  process.exitCode = 1;
} finally {
  if (dataSource.isInitialized) await dataSource.destroy();
}

/** `tsx server/db/migrate.ts`: applies pending migrations to DATABASE_URL. */
import { loadConfig } from '../config';
import { createDataSource, runMigrations } from './data-source';

const config = loadConfig();
const dataSource = createDataSource(config.databaseUrl);
try {
  await dataSource.initialize();
  const ran = await runMigrations(dataSource);
  console.log(ran.length ? `Applied migrations: ${ran.join(', ')}` : 'Database schema is up to date.');
} catch (error) {
  console.error(`Migration failed: ${(error as Error).message}`);
  process.exitCode = 1;
} finally {
  if (dataSource.isInitialized) await dataSource.destroy();
}

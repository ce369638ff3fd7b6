import { DataSource } from 'typeorm';
import { causalSetEntities } from './causal-set-entities';
import { platformEntities } from './entities';
import { runEntities } from './run-entities';
import { studyEntities } from './study-entities';
import { tokenEntities } from './token-entities';
import { migrations } from './migrations/index';

/** Every EntitySchema the API and the worker use; later features append theirs here. */
const allEntities = [...platformEntities, ...runEntities, ...causalSetEntities, ...studyEntities, ...tokenEntities];

export function createDataSource(databaseUrl: string): DataSource {
  return new DataSource({
    type: 'postgres',
    url: databaseUrl,
    entities: allEntities,
    migrations,
    migrationsTableName: 'typeorm_migrations',
    synchronize: false,
    logging: ['error'],
    extra: { max: 10, connectionTimeoutMillis: 5_000 },
  });
}

/** Applies pending migrations, each in its own transaction; returns the names it ran. */
export async function runMigrations(dataSource: DataSource): Promise<string[]> {
  const ran = await dataSource.runMigrations({ transaction: 'each' });
  return ran.map((m) => m.name);
}

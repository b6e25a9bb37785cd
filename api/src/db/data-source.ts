import 'reflect-metadata';
import { DataSource } from 'typeorm';
import { entities, migrations } from './schema';

export function createDataSource(url: string, opts: { poolSize?: number } = {}): DataSource {
  return new DataSource({
    type: 'postgres',
    url,
    entities,
    migrations,
    migrationsTableName: 'schema_migrations',
    synchronize: false,
    logging: false,
    extra: { max: opts.poolSize ?? 10, connectionTimeoutMillis: 5000 },
  });
}

/** Ready when the database answers and no migration is pending. */
export async function databaseReadiness(db: DataSource): Promise<{ ok: boolean; reason?: string }> {
  try {
    await db.query('select 1');
    const pending = await db.showMigrations();
    return pending ? { ok: false, reason: 'migrations pending' } : { ok: true };
  } catch (err) {
    return { ok: false, reason: `database unreachable: ${(err as Error).message}` };
  }
}

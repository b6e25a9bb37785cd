import { loadConfig } from '../config';
import { createDataSource } from '../db/data-source';

const db = createDataSource(loadConfig().databaseUrl);
await db.initialize();
const applied = await db.runMigrations({ transaction: 'each' });
process.stdout.write(applied.length ? applied.map((m) => `applied ${m.name}\n`).join('') : 'no pending migrations\n');
await db.destroy();

import { randomBytes } from 'node:crypto';
import pg from 'pg';
import { inject } from 'vitest';

/** A fresh database cloned from the migrated template: real PostgreSQL, private to the caller. */
export async function createTestDatabase(): Promise<{ url: string; name: string; drop(): Promise<void> }> {
  const { baseUrl, template } = inject('pg');
  const name = `gw_t_${randomBytes(6).toString('hex')}`;
  const admin = new pg.Client({ connectionString: `${baseUrl}/postgres` });
  await admin.connect();
  try {
    for (let attempt = 0; ; attempt++) {
      try {
        await admin.query(`CREATE DATABASE "${name}" TEMPLATE "${template}"`);
        break;
      } catch (err) {
        // Two clones of one template at the same instant can collide; a short retry settles it.
        if (attempt >= 10 || !/being accessed by other users/.test((err as Error).message)) throw err;
        await new Promise((r) => setTimeout(r, 100 + Math.random() * 200));
      }
    }
  } finally {
    await admin.end();
  }
  return {
    url: `${baseUrl}/${name}`,
    name,
    async drop() {
      const c = new pg.Client({ connectionString: `${baseUrl}/postgres` });
      await c.connect();
      await c.query(`DROP DATABASE IF EXISTS "${name}" WITH (FORCE)`);
      await c.end();
    },
  };
}

import type pg from 'pg';
import type { DataSource } from 'typeorm';

/**
 * The node-postgres pool under a TypeORM data source, for the few queries on every request's path
 * that skip the ORM: a named statement is parsed and planned once per connection, and its row needs
 * no entity mapping.
 */
export const pgPoolOf = (db: DataSource): pg.Pool => (db.driver as unknown as { master: pg.Pool }).master;

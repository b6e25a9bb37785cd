import type { DataSource } from 'typeorm';

/**
 * Rows per table in the application schema and the job queue: a refused request must leave every
 * count as it was (nothing half-written). Exact counts, one query.
 */
export async function rowCounts(db: DataSource): Promise<Record<string, number>> {
  const tables: Array<{ schema: string; name: string }> = await db.query(
    `select table_schema as schema, table_name as name from information_schema.tables
      where table_type = 'BASE TABLE' and table_schema in ('public', 'pgboss')
        and table_name not in ('schema_migrations', 'version')
      order by 1, 2`,
  );
  if (tables.length === 0) return {};
  const sql = tables.map((t) => `select '${t.schema}.${t.name}' as t, count(*)::int as n from "${t.schema}"."${t.name}"`).join(' union all ');
  const rows: Array<{ t: string; n: number }> = await db.query(sql);
  return Object.fromEntries(rows.map((r) => [r.t, r.n]));
}

/** Tables whose counts differ between two snapshots, ignoring ones that only log (rate-limit counters, audit of refusals). */
export function changedTables(before: Record<string, number>, after: Record<string, number>, ignore: readonly string[] = []): string[] {
  const names = new Set([...Object.keys(before), ...Object.keys(after)]);
  return [...names].filter((n) => !ignore.includes(n) && (before[n] ?? 0) !== (after[n] ?? 0)).sort();
}

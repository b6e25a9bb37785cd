import type { ObjectLiteral, SelectQueryBuilder } from 'typeorm';
import { validationProblem } from './problem';

export interface Page<T> {
  items: T[];
  nextCursor: string | null;
}

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/;

/** Newest first, keyed on (created_at, id); the cursor is the opaque id of the last row returned. */
export async function paginateNewestFirst<T extends ObjectLiteral>(
  qb: SelectQueryBuilder<T>,
  table: string,
  opts: { cursor?: string; limit?: number },
): Promise<Page<T>> {
  const limit = Math.min(Math.max(opts.limit ?? 50, 1), 200);
  const a = qb.alias;
  if (opts.cursor) {
    const id = Buffer.from(opts.cursor, 'base64url').toString('utf8');
    if (!UUID.test(id)) throw validationProblem([{ pointer: '/query/cursor', message: 'not a cursor this list returned' }]);
    qb.andWhere(`(${a}.created_at, ${a}.id) < (SELECT c.created_at, c.id FROM ${table} c WHERE c.id = :cursorId)`, { cursorId: id });
  }
  const rows = await qb.orderBy(`${a}.created_at`, 'DESC').addOrderBy(`${a}.id`, 'DESC').take(limit + 1).getMany();
  const items = rows.slice(0, limit);
  const last = items[items.length - 1] as { id?: string } | undefined;
  return { items, nextCursor: rows.length > limit && last?.id ? Buffer.from(last.id).toString('base64url') : null };
}

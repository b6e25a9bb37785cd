import { DateTime } from 'luxon';
import type { SelectQueryBuilder } from 'typeorm';
import { validationProblem } from './problem';
import { isUuid } from './uuid';

export interface PageQuery {
  cursor?: string;
  limit?: number;
}

export interface Page<T> {
  items: T[];
  nextCursor: string | null;
}

/** Where the previous page ended: its last row's sort key (UTC, to the microsecond PostgreSQL keeps) and id. */
interface PageCursor {
  at: string;
  id: string;
}

const DEFAULT_PAGE_SIZE = 50;
const MAX_PAGE_SIZE = 200;

// Written by PostgreSQL's to_char, so the cursor never depends on the session's DateStyle or TimeZone.
const SORT_KEY_FORMAT = `YYYY-MM-DD"T"HH24:MI:SS.US"Z"`;
const SORT_KEY = /^(?!0000)\d{4}-\d{2}-\d{2}T\d{2}:\d{2}:\d{2}\.\d{6}Z$/;

const encodePageCursor = (cursor: PageCursor): string => Buffer.from(JSON.stringify({ at: cursor.at, id: cursor.id })).toString('base64url');

const notACursor = () => validationProblem([{ pointer: '/query/cursor', message: 'not a cursor this list returned' }]);

/**
 * Reads a cursor back, refusing with a 400 anything this API would not have issued. The calendar
 * check matters: JavaScript's Date turns 30 February into 1 March, PostgreSQL refuses it.
 */
function decodePageCursor(text: string): PageCursor {
  let value: unknown;
  try {
    value = JSON.parse(Buffer.from(text, 'base64url').toString('utf8'));
  } catch {
    throw notACursor();
  }
  if (!value || typeof value !== 'object' || Array.isArray(value) || Object.keys(value).length !== 2) throw notACursor();
  const { at, id } = value as Record<string, unknown>;
  if (typeof at !== 'string' || typeof id !== 'string' || !isUuid(id) || !SORT_KEY.test(at)) throw notACursor();
  if (!DateTime.fromISO(at, { zone: 'utc' }).isValid) throw notACursor();
  return { at, id };
}

/**
 * Keyset pagination, newest first on (`sortColumn`, id): pages stay stable while rows arrive, and
 * rows that share a timestamp (one transaction's) are neither repeated nor skipped.
 */
export async function pageNewestFirst<T extends { id: string }>(
  qb: SelectQueryBuilder<T>,
  query: PageQuery,
  sortColumn = 'created_at',
): Promise<Page<T>> {
  const limit = Math.min(Math.max(query.limit ?? DEFAULT_PAGE_SIZE, 1), MAX_PAGE_SIZE);
  const a = qb.alias;
  const sortKey = `${a}.${sortColumn}`;
  if (query.cursor) {
    const after = decodePageCursor(query.cursor);
    qb.andWhere(`(${sortKey}, ${a}.id) < (:pageAfterAt::timestamptz, :pageAfterId::uuid)`, { pageAfterAt: after.at, pageAfterId: after.id });
  }
  const { entities, raw } = await qb
    .addSelect(`to_char(${sortKey} AT TIME ZONE 'UTC', '${SORT_KEY_FORMAT}')`, 'page_at')
    .orderBy(sortKey, 'DESC')
    .addOrderBy(`${a}.id`, 'DESC')
    .limit(limit + 1)
    .getRawAndEntities();
  const items = entities.slice(0, limit);
  const last = items.at(-1);
  if (entities.length <= limit || !last) return { items, nextCursor: null };
  const lastRow = raw.find((row: Record<string, unknown>) => row[`${a}_id`] === last.id);
  return { items, nextCursor: encodePageCursor({ at: lastRow.page_at, id: last.id }) };
}

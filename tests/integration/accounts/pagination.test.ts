// Every cursor-paged list: pages cover the list exactly once in
// order, also when rows share a timestamp or differ below the millisecond, and a cursor the list did
// not issue is a 400 naming the `cursor` query parameter, never a 500.
import { randomUUID } from 'node:crypto';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { OutboxMessage } from '../../../api/src/db/entities/outbox-message';
import { createApiKey } from '../../../api/src/services/api-keys';
import { recordAudit } from '../../../api/src/services/audit';
import { createMember } from '../../../api/src/services/members';
import { createTenant } from '../../../api/src/services/tenants';
import { createTenantWithKey, createUserSession } from '../../support/tenants';
import { startTestApp, type TestApp } from '../../support/test-app';

const cursorOf = (value: unknown) => Buffer.from(JSON.stringify(value)).toString('base64url');

// Timestamps three apart by one microsecond, so JavaScript's milliseconds cannot tell them apart,
// and each shared by several rows, as the rows of one transaction share now().
const TIED_TIMES = ['2027-03-01T10:00:00.000001Z', '2027-03-01T10:00:00.000002Z', '2027-03-01T10:00:00.000003Z'];

const FORGED_CURSORS: [string, string][] = [
  ['not base64url JSON', 'not-a-cursor'],
  ['a bare id (an older format)', Buffer.from(randomUUID()).toString('base64url')],
  ['the wrong field names', cursorOf({ createdAt: '2027-03-01T10:00:00.000000Z', id: randomUUID() })],
  ['an extra field', cursorOf({ at: '2027-03-01T10:00:00.000000Z', id: randomUUID(), x: 1 })],
  ['an array', cursorOf(['2027-03-01T10:00:00.000000Z', randomUUID()])],
  ['an id that is not a UUID', cursorOf({ at: '2027-03-01T10:00:00.000000Z', id: '1; DROP TABLE users' })],
  // Each of these dates parses with JavaScript's Date; PostgreSQL refuses them.
  ['30 February', cursorOf({ at: '2027-02-30T10:00:00.000000Z', id: randomUUID() })],
  ['a bare number as a date', cursorOf({ at: '1', id: randomUUID() })],
  ['year 0', cursorOf({ at: '0000-01-01T00:00:00.000000Z', id: randomUUID() })],
  ['a date beyond PostgreSQL', cursorOf({ at: '+275760-09-13T00:00:00.000000Z', id: randomUUID() })],
];

describe('cursor pagination of the account lists', () => {
  let t: TestApp;
  let tenantId: string;
  let owner: Awaited<ReturnType<typeof createUserSession>>;
  let operator: Awaited<ReturnType<typeof createUserSession>>;
  const asOwner = (r: request.Test) => r.set('Cookie', owner.cookie);
  const asOperator = (r: request.Test) => r.set('Cookie', operator.cookie);

  /** Gives the rows `where` selects in `table` the tied timestamps, round-robin. */
  async function tieTimestamps(table: string, column: string, where: string, params: unknown[]) {
    await t.ctx.db.query(
      `UPDATE ${table} SET ${column} = ($${params.length + 1}::timestamptz[])[1 + (ordinal % 3)]
         FROM (SELECT id AS row_id, row_number() OVER (ORDER BY id) AS ordinal FROM ${table} WHERE ${where}) numbered
        WHERE id = numbered.row_id`,
      [...params, TIED_TIMES],
    );
  }

  const lists = () => [
    { name: 'members', path: '/v1/members', as: asOwner, table: 'users', column: 'created_at', where: 'tenant_id = $1', params: [tenantId] },
    { name: 'API keys', path: '/v1/api-keys', as: asOwner, table: 'api_keys', column: 'created_at', where: 'tenant_id = $1', params: [tenantId] },
    { name: 'audit events', path: '/v1/audit-events', as: asOwner, table: 'audit_events', column: 'created_at', where: 'tenant_id = $1', params: [tenantId] },
    { name: 'tenants (operators)', path: '/v1/admin/tenants', as: asOperator, table: 'tenants', column: 'created_at', where: 'true', params: [] },
    { name: 'audit events (operators)', path: '/v1/admin/audit-events', as: asOperator, table: 'audit_events', column: 'created_at', where: 'true', params: [] },
    { name: 'outbox (operators)', path: '/v1/admin/outbox', as: asOperator, table: 'outbox_messages', column: 'received_at', where: 'true', params: [] },
    { name: 'runs', path: '/v1/runs', as: asOwner, table: 'runs', column: 'created_at', where: 'tenant_id = $1', params: [tenantId] },
  ];

  beforeAll(async () => {
    t = await startTestApp();
    tenantId = (await createTenantWithKey(t.ctx)).tenantId;
    owner = await createUserSession(t.ctx, t.app, { tenantId, role: 'owner' });
    operator = await createUserSession(t.ctx, t.app, { tenantId, role: 'operator' });
    for (let i = 0; i < 6; i++) {
      await createTenant(t.ctx, { slug: `paged-${i}`, planId: 'pilot' }, {});
      await createApiKey(t.ctx, { tenantId, name: `paged ${i}`, scopes: ['runs:read'] }, {});
      await t.ctx.db.transaction((m) => createMember(t.ctx, m, { tenantId, email: `paged-${i}@example.test`, role: 'viewer' }));
      await recordAudit(t.ctx.db.manager, { tenantId, action: 'sign-in', target: `paged-${i}@example.test` });
      // A run row as submission writes it (no queue job: nothing here solves it).
      await t.ctx.db.query(
        `INSERT INTO runs (tenant_id, name, spec, steps, units, time_limit_seconds) VALUES ($1, $2, '{}', 1, 0, 60)`,
        [tenantId, `paged ${i}`],
      );
      await t.ctx.db.getRepository(OutboxMessage).insert({
        receivedAt: new Date(),
        tenantId,
        kind: 'other',
        mailFrom: 'no-reply@gridwright.local',
        rcptTo: [`paged-${i}@example.test`],
        subject: `paged ${i}`,
        textBody: 'x',
        htmlBody: null,
        messageId: null,
        raw: 'Subject: x\r\n\r\nx',
      });
    }
    for (const list of lists()) await tieTimestamps(list.table, list.column, list.where, list.params);
  });
  afterAll(async () => t.close());

  it('covers each list exactly once, newest first, two rows a page', async () => {
    for (const list of lists()) {
      const expected: { id: string }[] = await t.ctx.db.query(
        `SELECT id FROM ${list.table} WHERE ${list.where} ORDER BY ${list.column} DESC, id DESC`,
        list.params,
      );
      expect(expected.length, list.name).toBeGreaterThan(4);
      const seen: string[] = [];
      let cursor: string | null = null;
      do {
        const res: request.Response = await list.as(request(t.app).get(list.path).query({ limit: 2, ...(cursor ? { cursor } : {}) }));
        expect(res.status, list.name).toBe(200);
        seen.push(...res.body.items.map((item: { id: string }) => item.id));
        cursor = res.body.nextCursor;
      } while (cursor);
      expect(seen, list.name).toEqual(expected.map((row) => row.id));
    }
  });

  it('answers a cursor it did not issue with 400 naming the cursor parameter', async () => {
    for (const list of lists()) {
      for (const [what, cursor] of FORGED_CURSORS) {
        const res = await list.as(request(t.app).get(list.path).query({ cursor }));
        expect(res.status, `${list.name}: ${what}`).toBe(400);
        expect(res.headers['content-type'], `${list.name}: ${what}`).toMatch(/^application\/problem\+json/);
        expect(res.body.errors, `${list.name}: ${what}`).toEqual([{ pointer: '/query/cursor', message: 'not a cursor this list returned' }]);
      }
    }
  });

  it('takes a well-formed cursor for a row that is gone as a position in the list', async () => {
    const after = cursorOf({ at: TIED_TIMES[1], id: randomUUID() });
    for (const list of lists()) {
      const res = await list.as(request(t.app).get(list.path).query({ cursor: after }));
      expect(res.status, list.name).toBe(200);
    }
  });
});

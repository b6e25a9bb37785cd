// One validation of every input against the same limits, whatever the route: a power in an uploaded
// series meets the limits of a power written inline in a spec (shared/src/site-spec.ts), and every
// date-time a request carries is one PostgreSQL accepts, or a 400 naming it — never a 500.
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { MAX_POWER, MIN_POWER } from '@gridwright/shared/site-spec';
import { createTenantWithKey, createUserSession } from '../../support/tenants';
import { startTestApp, type TestApp } from '../../support/test-app';
import { smallSpec } from './run-helpers';

describe('input limits, whatever the route', () => {
  let t: TestApp;
  let apiKey: string;
  let tenantId: string;
  beforeAll(async () => {
    t = await startTestApp({ RATE_LIMIT_WINDOW_SECONDS: '3600' });
    ({ apiKey, tenantId } = await createTenantWithKey(t.ctx));
  });
  afterAll(async () => t.close());

  const upload = (csv: string) =>
    request(t.app).post('/v1/series').set('Authorization', `Bearer ${apiKey}`).attach('file', Buffer.from(csv), { filename: 'pv.csv', contentType: 'text/csv' });
  const hourly = (header: string, values: string[]) => `timestamp,${header}\n${values.map((v, i) => `2027-03-01T0${i}:00:00Z,${v}`).join('\n')}\n`;

  it.each([
    ['1e203 kW', 'pv [kW]', '1e203', /above 1000000000 kW/],
    ['a value past 1.8e302 kW (a mean over the step would overflow to null)', 'pv [kW]', '1.8e303', /above 1000000000 kW/],
    ['1e12 W… in MW: 1e7 MW', 'pv [MW]', '1e7', /above 1000000000 kW/],
    [`a power below ${MIN_POWER} kW that is not 0`, 'pv [W]', '0.0001', /below 0\.000001 kW/],
  ])('refuses a series value of %s, naming the row and the column', async (_what, header, value, message) => {
    const res = await upload(hourly(header, ['5', value, '7']));
    expect(res.status, res.text).toBe(400);
    expect(res.body.errors).toEqual([{ pointer: '/file', message: expect.stringMatching(new RegExp(`^row 3: column "${header.replace(/[[\]]/g, '\\$&')}": ${value} `)) }]);
    expect(res.body.errors[0].message).toMatch(message);
    const [{ n }] = await t.ctx.db.query(`SELECT count(*)::int AS n FROM series WHERE tenant_id = $1`, [tenantId]);
    expect(n).toBe(0);
  });

  it(`stores the largest power a spec may hold (${MAX_POWER} kW), 0 and the smallest non-zero one exactly`, async () => {
    const res = await upload(hourly('pv [kW]', [String(MAX_POWER), '0', '1e-6']));
    expect(res.status, res.text).toBe(201);
    const detail = await request(t.app).get(`/v1/series/${res.body.items[0].id}`).set('Authorization', `Bearer ${apiKey}`).expect(200);
    expect(detail.body.valuesKw).toEqual([MAX_POWER, 0, MIN_POWER]);
  });

  it('refuses a run on a series stored before uploads were held to the limits, naming the series', async () => {
    const [row] = await t.ctx.db.query(
      `INSERT INTO series (tenant_id, name, source_column, source_unit, start, start_offset, step_minutes, steps, step_values, source_rows, fill_policy)
       VALUES ($1, 'old', 'pv', 'kW', '2027-03-01T00:00:00Z', '+00:00', 60, 3, '[1, 2, 3]', 3, 'none') RETURNING id`,
      [tenantId],
    );
    // As a row stored before the database refused such values (the constraint holds for new rows only).
    await t.ctx.db.query(`ALTER TABLE series DROP CONSTRAINT series_values_check`);
    await t.ctx.db.query(`UPDATE series SET step_values = '[1, 1e203, null]' WHERE id = $1`, [row.id]);
    const spec = smallSpec({ horizon: { start: '2027-03-01T00:00:00Z', stepMinutes: 60, steps: 3 }, supply: { seriesId: row.id }, siteLoad: { kw: [20, 20, 20] } });
    const res = await request(t.app).post('/v1/specs/validate').set('Authorization', `Bearer ${apiKey}`).send(spec);
    expect(JSON.stringify(res.body), JSON.stringify(res.body)).toMatch(/\/supply\/seriesId/);
    expect(JSON.stringify(res.body)).toMatch(/step 1 \(1e\+203\)/);
  });

  it.each([
    ['30 February', '2027-02-30T00:00:00Z'],
    ['29 February of a common year', '2027-02-29T00:00:00Z'],
    ['year 0000', '0000-01-01T00:00:00Z'],
    ['an instant in year 10000 once taken to UTC', '9999-12-31T23:59:59-12:00'],
  ])('refuses %s as a runs-list bound with a 400 naming the parameter', async (_what, value) => {
    for (const name of ['createdAfter', 'createdBefore']) {
      const res = await request(t.app).get('/v1/runs').query({ [name]: value }).set('Authorization', `Bearer ${apiKey}`);
      expect(res.status, `${name}=${value}: ${res.text}`).toBe(400);
      expect(res.body.errors.map((e: { pointer: string }) => e.pointer)).toContain(`/query/${name}`);
    }
  });

  it('reads any offset a client writes as the instant it names, even one PostgreSQL would refuse', async () => {
    for (const [createdAfter, createdBefore] of [
      ['2027-01-01T00:00:00+16:00', '9999-12-31T00:00:00-12:00'],
      ['2027-01-01T00:00:00+23:59', '2028-01-01T00:00:00Z'],
    ]) {
      const res = await request(t.app).get('/v1/runs').query({ createdAfter, createdBefore }).set('Authorization', `Bearer ${apiKey}`);
      expect(res.status, res.text).toBe(200);
    }
  });

  it('refuses an API key expiry PostgreSQL could not store, naming the field', async () => {
    const owner = await createUserSession(t.ctx, t.app, { tenantId, role: 'owner' });
    const res = await request(t.app)
      .post('/v1/api-keys')
      .set('Cookie', owner.cookie)
      .set('X-CSRF-Token', owner.csrf)
      .send({ name: 'k', scopes: ['runs:read'], expiresAt: '2027-02-29T00:00:00Z' });
    expect(res.status, res.text).toBe(400);
    expect(res.body.errors.map((e: { pointer: string }) => e.pointer)).toEqual(['/expiresAt']);
  });

  it('refuses a CSV timestamp outside the years 0001–9999, naming its row', async () => {
    const res = await upload('timestamp,pv [kW]\n0000-12-31T23:00:00Z,1\n0001-01-01T00:00:00Z,2\n');
    expect(res.status, res.text).toBe(400);
    expect(res.body.errors[0].message).toMatch(/^row 2: timestamp "0000-12-31T23:00:00Z"/);
  });
});

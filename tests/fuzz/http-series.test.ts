// POST /v1/series under fuzzing: random and mangled CSV files, broken multipart framing, wrong
// content types and odd query options. Never a 5xx; refusals are problem+json; nothing is stored
// when the upload is refused; and a stored series holds only values a site spec could hold inline.
import fc from 'fast-check';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { kwValueRefusal } from '../../api/src/lib/kw-values';
import { createTenantWithKey } from '../support/tenants';
import { startTestApp, type TestApp } from '../support/test-app';
import { fuzzRuns, fuzzSeed } from './support/fuzz-runs';
import { expectCleanRefusal } from './support/problem-assertions';
import { changedTables, rowCounts } from './support/row-counts';

const GOOD_CSV = 'timestamp;pv [kW];wind (W)\n2027-03-28T00:00:00+01:00;1,5;2000\n2027-03-28T01:00:00+01:00;2,5;2500\n2027-03-28T03:00:00+02:00;3;\n';

const cell = fc.oneof(
  fc.constantFrom('', 'NaN', 'Infinity', '-Infinity', '1e309', '1,5', '1.5', '-0', '"x,y"', '"unterminated', '2027-13-45T25:61:00Z', '2027-03-28T02:30:00', '\u0000', '﻿'),
  fc.double().map(String),
  fc.string({ maxLength: 12 }),
);
const row = fc.array(cell, { minLength: 0, maxLength: 5 });
const delimiter = fc.constantFrom(',', ';', '\t', '|');
const randomCsv = fc.tuple(delimiter, fc.array(row, { maxLength: 30 })).map(([d, rows]) => rows.map((r) => r.join(d)).join(fc.sample(fc.constantFrom('\n', '\r\n', '\r'), 1)[0]));
const mangledCsv = fc.tuple(fc.integer({ min: 0, max: GOOD_CSV.length }), fc.string({ maxLength: 10 })).map(([cut, junk]) => GOOD_CSV.slice(0, cut) + junk + GOOD_CSV.slice(cut));
const longCsv = fc.integer({ min: 2_000, max: 20_000 }).map((n) => `timestamp,pv\n${Array.from({ length: n }, (_v, i) => `2027-01-01T00:00:00Z,${i}`).join('\n')}\n`);
const csvArb = fc.oneof(randomCsv, mangledCsv, longCsv, fc.string({ unit: 'binary', maxLength: 300 }));

const queryArb = fc.record(
  {
    stepMinutes: fc.constantFrom('5', '15', '60', '7', 'x', '-15'),
    timezone: fc.constantFrom('Europe/Berlin', 'America/New_York', 'Mars/Olympus', '', '../../etc/localtime'),
    unit: fc.constantFrom('W', 'kW', 'MW', 'GW'),
    fill: fc.constantFrom('none', 'zero', 'previous', 'linear', 'magic'),
    timestampFormat: fc.constantFrom('dd.MM.yyyy HH:mm', 'yyyy', '%Y', ''),
    columns: fc.string({ maxLength: 20 }),
    timestampColumn: fc.string({ maxLength: 20 }),
  },
  { requiredKeys: [] },
);

describe('POST /v1/series under fuzzing', () => {
  let t: TestApp;
  let apiKey: string;
  beforeAll(async () => {
    t = await startTestApp({ RATE_LIMIT_WINDOW_SECONDS: '3600' });
    ({ apiKey } = await createTenantWithKey(t.ctx));
  });
  afterAll(async () => t.close());

  const BOOKKEEPING = ['public.rate_limits'];

  it('accepts the well-formed upload the mutations start from', async () => {
    const res = await request(t.app)
      .post('/v1/series?timezone=Europe/Berlin&fill=previous')
      .set('Authorization', `Bearer ${apiKey}`)
      .attach('file', Buffer.from(GOOD_CSV), { filename: 'site.csv', contentType: 'text/csv' });
    expect(res.status, res.text).toBe(201);
  });

  it('refuses random, mangled and oversized-row CSV files cleanly, storing nothing', async () => {
    await fc.assert(
      fc.asyncProperty(csvArb, queryArb, async (csv, query) => {
        const before = await rowCounts(t.ctx.db);
        const res = await request(t.app)
          .post('/v1/series')
          .query(query)
          .set('Authorization', `Bearer ${apiKey}`)
          .attach('file', Buffer.from(csv), { filename: 'fuzz.csv', contentType: 'text/csv' });
        expectCleanRefusal(res, `upload ${JSON.stringify(query)} ${JSON.stringify(csv.slice(0, 120))}`);
        if (res.status >= 400) expect(changedTables(before, await rowCounts(t.ctx.db), BOOKKEEPING)).toEqual([]);
      }),
      { numRuns: fuzzRuns(60), seed: fuzzSeed(7301) },
    );
  });

  it('stores a series only when every value is one a spec may hold, and names the row and column otherwise', async () => {
    const magnitude = fc.oneof(
      fc.double({ min: 0, max: 1e308, noNaN: true }),
      fc.constantFrom(0, 1e-12, 5e-7, 1e-6, 1e9, 1e9 + 1, 1e203, 1.8e302, 1.7e308),
      fc.double({ min: 0, max: 1e4, noNaN: true }),
    );
    const upload = fc.tuple(fc.constantFrom('W', 'kW', 'MW'), fc.array(magnitude, { minLength: 2, maxLength: 6 }));
    await fc.assert(
      fc.asyncProperty(upload, async ([unit, values]) => {
        const csv = `timestamp,pv [${unit}]\n${values.map((v, i) => `2027-03-01T${String(i).padStart(2, '0')}:00:00Z,${v}`).join('\n')}\n`;
        const res = await request(t.app).post('/v1/series').set('Authorization', `Bearer ${apiKey}`).attach('file', Buffer.from(csv), { filename: 'm.csv', contentType: 'text/csv' });
        expectCleanRefusal(res, csv);
        if (res.status === 201) {
          const [stored] = await t.ctx.db.query(`SELECT step_values FROM series WHERE id = $1`, [res.body.items[0].id]);
          expect(stored.step_values.filter((kw: number) => kwValueRefusal(kw) !== null), csv).toEqual([]);
        } else {
          expect(res.status, csv).toBe(400);
          expect(res.body.errors[0].message, csv).toMatch(/^row \d+: column "pv \[\w+\]"/);
        }
      }),
      { numRuns: fuzzRuns(40), seed: fuzzSeed(7303) },
    );
  });

  it('refuses broken multipart framing and wrong content types cleanly', async () => {
    const framing = fc.oneof(
      fc.constant({ contentType: 'multipart/form-data; boundary=xyz', body: '--xyz\r\nContent-Disposition: form-data; name="file"; filename="a.csv"\r\n\r\ntimestamp,pv\r\n2027' }),
      fc.constant({ contentType: 'multipart/form-data', body: '--xyz\r\n\r\n--xyz--' }),
      fc.constant({ contentType: 'multipart/form-data; boundary=xyz', body: '--xyz\r\nContent-Disposition: form-data; name="other"\r\n\r\nvalue\r\n--xyz--\r\n' }),
      fc.constant({ contentType: 'multipart/form-data; boundary=xyz', body: '--xyz\r\nContent-Disposition: form-data; name="file"; filename="a.csv"\r\n\r\na\r\n--xyz\r\nContent-Disposition: form-data; name="file"; filename="b.csv"\r\n\r\nb\r\n--xyz--\r\n' }),
      fc.tuple(fc.constantFrom('text/csv', 'application/json', 'application/octet-stream', 'text/plain', 'application/x-www-form-urlencoded'), csvArb).map(([contentType, body]) => ({ contentType, body })),
      fc.string({ maxLength: 200 }).map((body) => ({ contentType: 'multipart/form-data; boundary=b', body })),
    );
    await fc.assert(
      fc.asyncProperty(framing, async ({ contentType, body }) => {
        const before = await rowCounts(t.ctx.db);
        const res = await request(t.app).post('/v1/series').set('Authorization', `Bearer ${apiKey}`).set('Content-Type', contentType).send(body);
        expectCleanRefusal(res, `${contentType} ${JSON.stringify(body.slice(0, 80))}`);
        expect(res.status).toBeGreaterThanOrEqual(400);
        expect(changedTables(before, await rowCounts(t.ctx.db), BOOKKEEPING)).toEqual([]);
      }),
      { numRuns: fuzzRuns(30), seed: fuzzSeed(7302) },
    );
  });
});

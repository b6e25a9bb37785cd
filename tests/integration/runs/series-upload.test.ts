import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTenantWithKey } from '../../support/tenants';
import { startTestApp, type TestApp } from '../../support/test-app';
import { bearer } from './run-helpers';

const upload = (t: TestApp, key: string, csv: string, query = '', filename = 'export.csv') =>
  request(t.app).post(`/v1/series${query}`).set(bearer(key)).attach('file', Buffer.from(csv, 'utf8'), { filename, contentType: 'text/csv' });

describe('uploading series as CSV', () => {
  let t: TestApp;
  let key: string;
  beforeAll(async () => {
    t = await startTestApp({ SERIES_MAX_BYTES: '20000' });
    key = (await createTenantWithKey(t.ctx)).apiKey;
  });
  afterAll(async () => t.close());

  it('reads a day with the autumn DST change in a named zone: 25 local hours, the repeated hour in order', async () => {
    // Europe/Berlin leaves summer time on 2027-10-31 at 03:00 CEST → 02:00 CET (the EU rule, from
    // memory: last Sunday of October, 01:00 UTC), so local 02:00–02:59 occurs twice: a 25-hour day.
    const hours = ['00', '01', '02', '02', '03', '04', '05', '06', '07', '08', '09', '10', '11', '12', '13', '14', '15', '16', '17', '18', '19', '20', '21', '22', '23'];
    const csv = ['time;pv [kW]', ...hours.map((h, i) => `2027-10-31 ${h}:00;${i * 10}`)].join('\n');
    const res = await upload(t, key, csv, '?timezone=Europe/Berlin&stepMinutes=60');
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    const s = res.body.items[0];
    expect(s).toMatchObject({ steps: 25, stepMinutes: 60, start: '2027-10-31T00:00:00+02:00', sourceUnit: 'kW' });
    // The next local midnight, 2027-11-01T00:00+01:00, is 23:00 UTC.
    expect(new Date(s.end).toISOString()).toBe('2027-10-31T23:00:00.000Z');
    const full = await request(t.app).get(`/v1/series/${s.id}`).set(bearer(key)).expect(200);
    expect(full.body.valuesKw).toEqual(hours.map((_, i) => i * 10));
  });

  it('refuses a local time the spring DST change skips, naming the row', async () => {
    // Europe/Berlin 2027-03-28 (EU rule, from memory: last Sunday of March): 02:00 CET jumps to 03:00 CEST, so 02:30 does not exist.
    const csv = 'time,pv [kW]\n2027-03-28 01:30,1\n2027-03-28 02:30,2\n2027-03-28 03:30,3\n';
    const res = await upload(t, key, csv, '?timezone=Europe/Berlin');
    expect(res.status).toBe(400);
    expect(res.body.errors[0]).toEqual({ pointer: '/file', message: expect.stringMatching(/^row 3: local time .* does not exist in Europe\/Berlin/) });
  });

  it('detects a semicolon delimiter with decimal commas and converts a W header to kW', async () => {
    const csv = 'Zeitstempel;Einspeisung (W)\n2027-03-01T00:00:00+01:00;1250,5\n2027-03-01T00:15:00+01:00;2000\n2027-03-01T00:30:00+01:00;1.500,25\n2027-03-01T00:45:00+01:00;0,5\n';
    const res = await upload(t, key, csv);
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect(res.body.items[0]).toMatchObject({ stepMinutes: 15, steps: 4, sourceUnit: 'W', unit: 'kW' });
    const full = await request(t.app).get(`/v1/series/${res.body.items[0].id}`).set(bearer(key)).expect(200);
    expect(full.body.valuesKw).toEqual([1.2505, 2, 1.50025, 0.0005]);
  });

  it('resamples finer, irregular samples to the step by time-weighted mean, one series per value column', async () => {
    // Hand derivation: 00:00–00:10 at 6 kW, 00:10–00:15 at 12 kW → (6·10 + 12·5) / 15 = 8 kW; then 3 kW for a whole step.
    const csv = 'ts,a [MW],b [kW]\n2027-03-01T00:00:00Z,0.006,1\n2027-03-01T00:10:00Z,0.012,1\n2027-03-01T00:15:00Z,0.003,2\n2027-03-01T00:20:00Z,0.003,2\n2027-03-01T00:25:00Z,0.003,2\n';
    const res = await upload(t, key, csv, '?stepMinutes=15&fill=none');
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect(res.body.items.map((s: any) => s.column)).toEqual(['a [MW]', 'b [kW]']);
    const a = await request(t.app).get(`/v1/series/${res.body.items[0].id}`).set(bearer(key)).expect(200);
    expect(a.body.valuesKw).toEqual([8, 3]);
  });

  it('reports a gap by its rows unless a fill policy is chosen', async () => {
    const csv = 'ts,pv [kW]\n2027-03-01T00:00:00Z,10\n2027-03-01T00:15:00Z,20\n2027-03-01T01:00:00Z,50\n2027-03-01T01:15:00Z,60\n2027-03-01T01:30:00Z,\n2027-03-01T01:45:00Z,80\n';
    const refused = await upload(t, key, csv);
    expect(refused.status).toBe(400);
    expect(refused.body.type).toBe('/problems/series-missing-values');
    expect(refused.body.errors.map((e: any) => e.message)).toEqual([
      expect.stringMatching(/^rows 3–4: no samples from 2027-03-01T00:30:00Z to 2027-03-01T01:00:00Z/),
      'row 6: column "pv [kW]" has no value',
    ]);
    const filled = await upload(t, key, csv, '?fill=linear');
    expect(filled.status, JSON.stringify(filled.body)).toBe(201);
    expect(filled.body.items[0]).toMatchObject({ steps: 8, fillPolicy: 'linear', filledSteps: 3 });
    const full = await request(t.app).get(`/v1/series/${filled.body.items[0].id}`).set(bearer(key)).expect(200);
    expect(full.body.valuesKw).toEqual([10, 20, 30, 40, 50, 60, 70, 80]);
  });

  it('answers a malformed row with 400 naming the row', async () => {
    const ragged = await upload(t, key, 'ts,pv [kW]\n2027-03-01T00:00:00Z,1\n2027-03-01T00:15:00Z,2,9\n');
    expect(ragged.status).toBe(400);
    expect(ragged.body.errors[0].message).toMatch(/^row 3: /);
    const notNumber = await upload(t, key, 'ts,pv [kW]\n2027-03-01T00:00:00Z,1\n2027-03-01T00:15:00Z,lots\n');
    expect(notNumber.status).toBe(400);
    expect(notNumber.body.errors[0].message).toBe('row 3: column "pv [kW]": "lots" is not a number');
    const badTime = await upload(t, key, 'ts,pv [kW]\n2027-03-01T00:00:00Z,1\nsoon,2\n');
    expect(badTime.body.errors[0].message).toMatch(/^row 3: timestamp "soon"/);
    const noUnit = await upload(t, key, 'ts,pv\n2027-03-01T00:00:00Z,1\n');
    expect(noUnit.status).toBe(400);
    expect(noUnit.body.errors[0].pointer).toBe('/unit');
    const missingFile = await request(t.app).post('/v1/series').set(bearer(key)).field('note', 'no file');
    expect(missingFile.status).toBe(400);
    expect(missingFile.body.errors[0].pointer).toBe('/file');
  });

  it('refuses a file over the size limit with 413 problem+json', async () => {
    const rows = Array.from({ length: 2000 }, (_, i) => `2027-03-01T00:${String(i % 60).padStart(2, '0')}:00Z,${i}`);
    const res = await upload(t, key, ['ts,pv [kW]', ...rows].join('\n'));
    expect(res.status).toBe(413);
    expect(res.headers['content-type']).toMatch(/application\/problem\+json/);
    expect(res.body.errors[0].pointer).toBe('/file');
  });

  it('lets a spec use an uploaded series as its supply', async () => {
    const csv = ['ts,pv [kW]', ...Array.from({ length: 8 }, (_, i) => `2027-03-01T0${i}:00:00+01:00,${(i + 1) * 10}`)].join('\n');
    const up = await upload(t, key, csv);
    expect(up.status).toBe(201);
    const id = up.body.items[0].id;
    const spec = { horizon: { start: '2027-03-01T02:00:00+01:00', stepMinutes: 60, steps: 4 }, supply: { seriesId: id } };
    const ok = await request(t.app).post('/v1/specs/validate').set(bearer(key)).send(spec);
    expect(ok.status, JSON.stringify(ok.body)).toBe(200);
    const tooLong = await request(t.app).post('/v1/specs/validate').set(bearer(key)).send({ ...spec, horizon: { ...spec.horizon, steps: 9 } });
    expect(tooLong.status).toBe(400);
    expect(tooLong.body.errors[0].pointer).toBe('/supply/seriesId');
    const other = await createTenantWithKey(t.ctx);
    expect((await request(t.app).get(`/v1/series/${id}`).set(bearer(other.apiKey))).status).toBe(404);
    expect((await request(t.app).post('/v1/specs/validate').set(bearer(other.apiKey)).send(spec)).status).toBe(400);
  });
});

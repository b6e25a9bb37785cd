// A CSV export becomes a spec: each column's kind (power, price, rate) and suggested role, the
// horizon the file offers in its own time zone, and POST /v1/series/spec-draft, which builds spec
// fields from role assignments into a base spec. Every refusal names its field.
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTenantWithKey } from '../../support/tenants';
import { startTestApp, type TestApp } from '../../support/test-app';
import { bearer, smallSpec } from './run-helpers';

const hours = (n: number, from = 0) => Array.from({ length: n }, (_, i) => `2027-06-01 ${String(from + i).padStart(2, '0')}:00`);

/** Six local hours in Lisbon (WEST, +01:00 in June): solar, load, a day-ahead price in EUR/MWh, a rate, a reserve. */
const SITE_CSV = [
  'time (Europe/Lisbon);solar [kW];site load [kW];day-ahead price [EUR/MWh];water demand [m3/h];reserve [kW]',
  ...hours(6, 6).map((t, i) => `${t};${[0, 40, 120, 200, 240, 180][i]};${[60, 70, 80, 80, 75, 70][i]};${[95, 88, -12, -5, 40, 110][i]};${12 + i};${30}`),
].join('\n');

describe('series kinds, roles and spec drafts', () => {
  let t: TestApp;
  let key: string;
  const upload = (csv: string, query = '') =>
    request(t.app).post(`/v1/series${query}`).set(bearer(key)).attach('file', Buffer.from(csv, 'utf8'), { filename: 'pump-yard.csv', contentType: 'text/csv' });
  const draft = (body: unknown) => request(t.app).post('/v1/series/spec-draft').set(bearer(key)).send(body as object);

  let ids: Record<string, string>;
  beforeAll(async () => {
    t = await startTestApp();
    key = (await createTenantWithKey(t.ctx)).apiKey;
    const res = await upload(SITE_CSV);
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    ids = Object.fromEntries(res.body.items.map((s: { suggestedRole: string; id: string }) => [s.suggestedRole, s.id]));
  });
  afterAll(async () => t.close());

  it('reads each column as a power, a price or a rate, suggests its role and offers the horizon in the zone the header names', async () => {
    const res = await request(t.app).get('/v1/series').set(bearer(key)).expect(200);
    const byColumn = Object.fromEntries(res.body.items.map((s: { column: string }) => [s.column, s]));
    expect(byColumn['solar [kW]']).toMatchObject({ kind: 'power', unit: 'kW', sourceUnit: 'kW', suggestedRole: 'supply', timeZone: 'Europe/Lisbon', steps: 6 });
    expect(byColumn['site load [kW]']).toMatchObject({ kind: 'power', suggestedRole: 'siteLoad' });
    expect(byColumn['day-ahead price [EUR/MWh]']).toMatchObject({ kind: 'price', unit: 'per kWh', sourceUnit: 'EUR/MWh', suggestedRole: 'importPrice' });
    expect(byColumn['water demand [m3/h]']).toMatchObject({ kind: 'rate', unit: 'm3/h', suggestedRole: 'storeDemand' });
    expect(byColumn['reserve [kW]']).toMatchObject({ kind: 'power', suggestedRole: 'reserve' });
    // One file, one upload id; local 06:00 in Lisbon in June is 05:00 UTC (WEST = UTC+1, from memory: EU summer time).
    expect(new Set(res.body.items.map((s: { uploadId: string }) => s.uploadId)).size).toBe(1);
    expect(byColumn['solar [kW]'].start).toBe('2027-06-01T06:00:00+01:00');

    const again = await upload(SITE_CSV);
    expect(again.body.horizon).toEqual({ start: '2027-06-01T06:00:00+01:00', stepMinutes: 60, steps: 6, timeZone: 'Europe/Lisbon' });
  });

  it('stores a price per kWh, negative ones included, and never converts it as a power', async () => {
    const price = await request(t.app).get(`/v1/series/${ids.importPrice}`).set(bearer(key)).expect(200);
    // EUR/MWh ÷ 1000 = EUR/kWh.
    expect(price.body.values).toEqual([0.095, 0.088, -0.012, -0.005, 0.04, 0.11]);
    expect(price.body.valuesKw).toBeUndefined();
    const forcedUnit = await upload(SITE_CSV, '?unit=MW');
    const items = forcedUnit.body.items as { column: string; id: string }[];
    const forcedPrice = await request(t.app).get(`/v1/series/${items.find((s) => s.column.startsWith('day-ahead'))!.id}`).set(bearer(key)).expect(200);
    expect(forcedPrice.body.values).toEqual(price.body.values);
    const forcedSolar = await request(t.app).get(`/v1/series/${items.find((s) => s.column.startsWith('solar'))!.id}`).set(bearer(key)).expect(200);
    expect(forcedSolar.body.valuesKw).toEqual([0, 40_000, 120_000, 200_000, 240_000, 180_000]);
  });

  it('refuses a negative power but reads a header that says price without a unit as money per kWh', async () => {
    const negative = await upload('ts,pv [kW]\n2027-06-01T00:00:00Z,1\n2027-06-01T01:00:00Z,-2\n');
    expect(negative.status).toBe(400);
    expect(negative.body.errors).toEqual([{ pointer: '/file', message: 'row 3: column "pv [kW]": -2 is negative; a power per step is at least 0' }]);
    const plain = await upload('ts,export tariff\n2027-06-01T00:00:00Z,0.07\n2027-06-01T01:00:00Z,-0.01\n');
    expect(plain.status, JSON.stringify(plain.body)).toBe(201);
    expect(plain.body.items[0]).toMatchObject({ kind: 'price', unit: 'per kWh', suggestedRole: 'exportPrice' });
    const tooDear = await upload('ts,price [EUR/kWh]\n2027-06-01T00:00:00Z,2000000\n2027-06-01T01:00:00Z,1\n');
    expect(tooDear.status).toBe(400);
    expect(tooDear.body.errors[0].message).toMatch(/^row 2: column "price \[EUR\/kWh\]": 2000000 EUR\/kWh is beyond ±1000000/);
  });

  it('builds the spec fields from the roles into a base spec, with the horizon of the file', async () => {
    const base = {
      ...smallSpec(),
      stores: [{ id: 'reservoir', unit: 'm3', capacity: 500, initial: 250 }],
      units: [{ id: 'pump-1', kind: 'flexible-load', ratingKw: 90, minStableKw: 30, produces: { store: 'reservoir', perKwh: 0.5 } }],
    };
    const res = await draft({
      assignments: [
        { seriesId: ids.supply, role: 'supply' },
        { seriesId: ids.siteLoad, role: 'siteLoad' },
        { seriesId: ids.importPrice, role: 'importPrice' },
        { seriesId: ids.storeDemand, role: 'storeDemand', storeId: 'reservoir' },
        { seriesId: ids.reserve, role: 'reserve' },
      ],
      base,
    });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    const spec = res.body.spec;
    expect(spec.horizon).toEqual({ start: '2027-06-01T06:00:00+01:00', stepMinutes: 60, steps: 6, timeZone: 'Europe/Lisbon' });
    expect(spec.supply).toEqual({ seriesId: ids.supply });
    expect(spec.siteLoad.kw).toEqual([60, 70, 80, 80, 75, 70]);
    // What the roles do not set stays as the base had it.
    expect(spec.grid).toEqual({ ...base.grid, importPrice: [0.095, 0.088, -0.012, -0.005, 0.04, 0.11] });
    expect(spec.stores[0]).toEqual({ ...base.stores[0], demandPerHour: [12, 13, 14, 15, 16, 17] });
    expect(spec.reserve).toEqual({ upKw: [30, 30, 30, 30, 30, 30] });
    expect(spec.units).toEqual(base.units);
    expect(res.body).toMatchObject({ notes: [], problems: [] });
    // The draft is a spec the API takes as it is, its supply read from the series.
    const validated = await request(t.app).post('/v1/specs/validate').set(bearer(key)).send(spec);
    expect(validated.status, JSON.stringify(validated.body)).toBe(200);
  });

  it('takes a window of the steps, notes a price without a grid limit, and reports what of the base no longer fits', async () => {
    const res = await draft({
      assignments: [
        { seriesId: ids.siteLoad, role: 'siteLoad' },
        { seriesId: ids.importPrice, role: 'importPrice' },
      ],
      horizon: { start: '2027-06-01T07:00:00+01:00', steps: 3 },
      base: { horizon: { start: '2027-01-01T00:00:00Z', stepMinutes: 60, steps: 8, timeZone: 'America/Sao_Paulo' }, supply: { availableKw: [1, 2, 3, 4, 5, 6, 7, 8] } },
    });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    // The file's own zone wins over the base's.
    expect(res.body.spec.horizon).toEqual({ start: '2027-06-01T07:00:00+01:00', stepMinutes: 60, steps: 3, timeZone: 'Europe/Lisbon' });
    expect(res.body.spec.siteLoad.kw).toEqual([70, 80, 80]);
    expect(res.body.spec.grid.importPrice).toEqual([0.088, -0.012, -0.005]);
    expect(res.body.notes).toEqual([{ pointer: '/grid/importLimitKw', message: expect.stringMatching(/^is 0 \(the default\), so nothing is imported/) }]);
    expect(res.body.problems).toEqual([{ pointer: '/supply/availableKw', message: 'has 8 values; horizon.steps is 3' }]);
  });

  it("keeps the base's time zone for a file with offsets only when the zone has the file's offset, else removes it with a note", async () => {
    const offsets = await upload('ts,pv [kW]\n2027-06-01T00:00:00+02:00,1\n2027-06-01T01:00:00+02:00,2\n');
    const seriesId = offsets.body.items[0].id;
    expect(offsets.body.horizon).toEqual({ start: '2027-06-01T00:00:00+02:00', stepMinutes: 60, steps: 2 });
    const base = (timeZone: string) => ({ horizon: { start: '2027-01-01T00:00:00Z', stepMinutes: 60, steps: 2, timeZone } });
    const kept = await draft({ assignments: [{ seriesId, role: 'supply' }], base: base('Europe/Berlin') });
    expect(kept.body.spec.horizon).toEqual({ start: '2027-06-01T00:00:00+02:00', stepMinutes: 60, steps: 2, timeZone: 'Europe/Berlin' });
    const removed = await draft({ assignments: [{ seriesId, role: 'supply' }], base: base('Asia/Tokyo') });
    expect(removed.body.spec.horizon).toEqual({ start: '2027-06-01T00:00:00+02:00', stepMinutes: 60, steps: 2 });
    expect(removed.body.notes[0].pointer).toBe('/horizon/timeZone');
  });

  it('refuses each wrong assignment with 400 naming it', async () => {
    const quarterHours = await upload('ts,pv [kW]\n2027-06-01T05:00:00Z,1\n2027-06-01T05:15:00Z,2\n2027-06-01T05:30:00Z,2\n');
    const later = await upload('ts,pv [kW]\n2027-07-01T00:00:00Z,1\n2027-07-01T01:00:00Z,2\n');
    const cases: [string, unknown, string, RegExp][] = [
      ['an unknown series', { assignments: [{ seriesId: 'ser_00000000000000000000000000000000', role: 'supply' }] }, '/assignments/0/seriesId', /^no series/],
      ['a price as the supply', { assignments: [{ seriesId: ids.importPrice, role: 'supply' }] }, '/assignments/0/role', /^supply takes a power series; .* is a price \(per kWh\)$/],
      ['a power as a price', { assignments: [{ seriesId: ids.supply, role: 'exportPrice' }] }, '/assignments/0/role', /takes a price series/],
      ['a role twice', { assignments: [{ seriesId: ids.supply, role: 'supply' }, { seriesId: ids.reserve, role: 'supply' }] }, '/assignments/1/role', /already assigned at \/assignments\/0/],
      ["a store's demand without the store", { assignments: [{ seriesId: ids.storeDemand, role: 'storeDemand' }] }, '/assignments/0/storeId', /names the store/],
      ['a store the base lacks', { assignments: [{ seriesId: ids.storeDemand, role: 'storeDemand', storeId: 'tank' }], base: { stores: [] } }, '/assignments/0/storeId', /no store "tank"/],
      ['a store on another role', { assignments: [{ seriesId: ids.supply, role: 'supply', storeId: 'tank' }] }, '/assignments/0/storeId', /only storeDemand/],
      ['series that step differently', { assignments: [{ seriesId: ids.supply, role: 'supply' }, { seriesId: quarterHours.body.items[0].id, role: 'reserve' }] }, '/assignments/1/seriesId', /15-minute steps/],
      ['series that share no step', { assignments: [{ seriesId: ids.supply, role: 'supply' }, { seriesId: later.body.items[0].id, role: 'reserve' }] }, '/assignments', /share no step/],
      ['a start between steps', { assignments: [{ seriesId: ids.supply, role: 'supply' }], horizon: { start: '2027-06-01T07:30:00+01:00' } }, '/horizon/start', /start of a step/],
      ['a start after the series', { assignments: [{ seriesId: ids.supply, role: 'supply' }], horizon: { start: '2027-06-01T12:00:00+01:00' } }, '/horizon/start', /start of a step/],
      ['more steps than the series cover', { assignments: [{ seriesId: ids.supply, role: 'supply' }], horizon: { start: '2027-06-01T10:00:00+01:00', steps: 3 } }, '/horizon/steps', /3 exceeds the 2 steps/],
      ['an unknown field', { assignments: [{ seriesId: ids.supply, role: 'supply' }], tenantId: 'x' }, '/tenantId', /./],
      ['an unknown role', { assignments: [{ seriesId: ids.supply, role: 'wind' }] }, '/assignments/0/role', /./],
    ];
    for (const [what, body, pointer, message] of cases) {
      const res = await draft(body);
      expect(res.status, what).toBe(400);
      expect(res.headers['content-type'], what).toMatch(/application\/problem\+json/);
      expect(res.body.errors, what).toEqual(expect.arrayContaining([{ pointer, message: expect.stringMatching(message) }]));
    }
  });

  it('refuses a spec whose supply names a price series, naming the field', async () => {
    const spec = smallSpec({ horizon: { start: '2027-06-01T06:00:00+01:00', stepMinutes: 60, steps: 6 }, supply: { seriesId: ids.importPrice }, siteLoad: undefined });
    const res = await request(t.app).post('/v1/specs/validate').set(bearer(key)).send(spec);
    expect(res.status).toBe(400);
    expect(res.body.errors).toEqual([{ pointer: '/supply/seriesId', message: expect.stringMatching(/holds a price \(per kWh\); the supply is a power in kW/) }]);
  });

  it('has the database refuse prices beyond the contract, negative powers and a power stored in another unit', async () => {
    const [{ tenant_id: tenantId }] = await t.ctx.db.query(`SELECT tenant_id FROM series WHERE id = $1`, [ids.supply]);
    const insert = (kind: string, unit: string, values: string) =>
      t.ctx.db.query(
        `INSERT INTO series (tenant_id, name, source_column, source_unit, kind, unit, start, start_offset, step_minutes, steps, step_values, source_rows, fill_policy)
         VALUES ($1, 'x', 'x', 'x', $2, $3, now(), '+00:00', 60, 2, $4, 2, 'none')`,
        [tenantId, kind, unit, values],
      );
    await expect(insert('price', 'per kWh', '[-0.5, 0.2]')).resolves.toBeDefined();
    for (const [kind, unit, values] of [
      ['price', 'per kWh', '[2000000, 1]'],
      ['price', 'per kWh', '[1e-12, 1]'],
      ['power', 'kW', '[-1, 1]'],
      ['rate', 'kg/h', '[-1, 1]'],
      ['power', 'MW', '[1, 1]'],
      ['price', 'per MWh', '[1, 1]'],
      ['heat', 'kW', '[1, 1]'],
    ]) {
      await expect(insert(kind, unit, values), `${kind} ${unit} ${values}`).rejects.toMatchObject({ code: '23514' });
    }
  });
});

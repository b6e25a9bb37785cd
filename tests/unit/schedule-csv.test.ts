import { parse } from 'csv-parse/sync';
import { describe, expect, it } from 'vitest';
import type { Schedule } from '@gridwright/shared/run-result';
import { scheduleToCsv, type ScheduleCsvOptions } from '../../api/src/services/schedule-csv';

// A hand-made two-step v1.1 schedule: a genset that holds reserve, a battery that holds reserve, a flexible
// load that does not, a diesel tank in litres, and a marginal value of energy unknown at step 1.
const schedule: Schedule = {
  timestamps: ['2027-03-28T01:00:00+01:00', '2027-03-28T03:00:00+02:00'],
  supplyUsedKw: [120, 80],
  curtailedKw: [0, 5],
  unservedKw: [0, 0],
  grid: { importKw: [0, 0], exportKw: [0, 0] },
  units: {
    'gen-a': { on: [1, 1], powerKw: [150, 200], reserveKw: [100, 50] },
    'ice-maker': { on: [1, 0], powerKw: [40, 0] },
  },
  storage: { bess: { chargeKw: [30, 0], dischargeKw: [0, 20], socKwh: [228.5, 207.4], reserveKw: [60, 80] } },
  stores: { 'diesel-tank': { level: [4136.766, 4073.478], shortfall: [0, 1.5], spill: [0, 0] } },
  reserve: { requiredKw: [150, 150], providedKw: [160, 130], shortfallKw: [0, 20] },
  marginalValues: { energyPerKwh: [0.29, null], stores: { 'diesel-tank': [0, 0.75] } },
};

const kw: ScheduleCsvOptions = { powerUnit: 'kW', timestamps: 'offset', delimiter: ',', tagMap: {} };
const rows = (csv: string, delimiter = ',') => parse(csv, { columns: true, delimiter }) as Record<string, string>[];

describe('schedule CSV', () => {
  it('keeps the v1 columns first, in their v1 order, and adds the v1.1 columns after them', () => {
    const header = scheduleToCsv(schedule, kw).split('\r\n')[0].split(',');
    expect(header).toEqual([
      'timestamp',
      'site.supplyUsedKw', 'site.curtailedKw', 'site.unservedKw', 'grid.importKw', 'grid.exportKw',
      'gen-a.on', 'gen-a.powerKw', 'ice-maker.on', 'ice-maker.powerKw',
      'bess.chargeKw', 'bess.dischargeKw', 'bess.socKwh',
      'site.reserveRequiredKw', 'site.reserveHeldKw', 'site.reserveShortfallKw', 'site.marginalValuePerKwh',
      'gen-a.reserveKw', 'bess.reserveKw',
      'diesel-tank.level', 'diesel-tank.shortfall', 'diesel-tank.spill', 'diesel-tank.marginalValue',
    ]);
  });

  it('writes every value as the schedule has it, and an unknown marginal value as an empty field', () => {
    const [first, second] = rows(scheduleToCsv(schedule, kw));
    expect(first).toMatchObject({ 'site.reserveHeldKw': '160', 'gen-a.reserveKw': '100', 'bess.reserveKw': '60', 'site.marginalValuePerKwh': '0.29', 'diesel-tank.level': '4136.766' });
    expect(second).toMatchObject({ 'site.reserveShortfallKw': '20', 'site.marginalValuePerKwh': '', 'diesel-tank.shortfall': '1.5', 'diesel-tank.marginalValue': '0.75' });
  });

  it("scales powers and energies to MW and the value of energy to money per MWh, never a store's own unit", () => {
    const [first, second] = rows(scheduleToCsv(schedule, { ...kw, powerUnit: 'MW' }));
    // 150 kW = 0.15 MW; 228.5 kWh = 0.2285 MWh; 0.29 money/kWh = 290 money/MWh; litres stay litres.
    expect(first).toMatchObject({
      'gen-a.powerMw': '0.15',
      'gen-a.reserveMw': '0.1',
      'bess.socMwh': '0.2285',
      'site.reserveRequiredMw': '0.15',
      'site.marginalValuePerMwh': '290',
      'diesel-tank.level': '4136.766',
      'gen-a.on': '1',
    });
    expect(second).toMatchObject({ 'diesel-tank.shortfall': '1.5', 'diesel-tank.marginalValue': '0.75', 'site.marginalValuePerMwh': '' });
  });

  it("keeps the steps in the horizon's local time with offset, and in UTC otherwise", () => {
    // 01:00 +01:00 is 00:00 UTC; 03:00 +02:00 (after the change to summer time) is 01:00 UTC.
    expect(rows(scheduleToCsv(schedule, kw)).map((r) => r.timestamp)).toEqual(['2027-03-28T01:00:00+01:00', '2027-03-28T03:00:00+02:00']);
    expect(rows(scheduleToCsv(schedule, { ...kw, timestamps: 'utc' })).map((r) => r.timestamp)).toEqual(['2027-03-28T00:00:00Z', '2027-03-28T01:00:00Z']);
  });

  it('lets a tag map rename the v1.1 columns, before any MW renaming', () => {
    const tagMap = { 'diesel-tank.level': 'ISL.TANK1.LVL', 'site.reserveHeldKw': 'ISL.SR.HELD', 'site.marginalValuePerKwh': 'ISL.MV', 'gen-a.reserveKw': 'ISL.G1.SR' };
    const [first] = rows(scheduleToCsv(schedule, { ...kw, powerUnit: 'MW', tagMap }));
    expect(first).toMatchObject({ 'ISL.TANK1.LVL': '4136.766', 'ISL.SR.HELD': '0.16', 'ISL.MV': '290', 'ISL.G1.SR': '0.1' });
  });

  // RFC 4180 §2: records end in CRLF; a field holding the delimiter, a double quote or a line break is enclosed in
  // double quotes, and a double quote inside it is written twice.
  it('quotes tag names as RFC 4180 asks, with any delimiter', () => {
    const tagMap = { 'diesel-tank.level': 'Tank "North", level', 'site.reserveHeldKw': 'held\r\nreserve', 'gen-a.powerKw': 'G1;P' };
    const csv = scheduleToCsv(schedule, { ...kw, tagMap });
    expect(csv.endsWith('\r\n')).toBe(true);
    expect(csv).toContain(',"Tank ""North"", level",');
    expect(csv).toContain(',"held\r\nreserve",');
    expect(csv).toContain(',G1;P,');
    expect(Object.keys(rows(csv)[0])).toEqual(expect.arrayContaining(['Tank "North", level', 'held\r\nreserve', 'G1;P']));

    const semicolons = scheduleToCsv(schedule, { ...kw, delimiter: ';', tagMap });
    expect(semicolons).toContain(';"G1;P";');
    expect(semicolons).toContain(';"Tank ""North"", level";');
    expect(rows(semicolons, ';')[1]['G1;P']).toBe('200');
  });

  it('exports a schedule stored before v1.1 with its v1 columns alone', () => {
    const { stores: _s, reserve: _r, marginalValues: _m, ...v1 } = schedule;
    const stored = { ...v1, units: { 'ice-maker': schedule.units['ice-maker'] }, storage: { bess: { ...schedule.storage.bess, reserveKw: undefined } } };
    expect(scheduleToCsv(stored, kw).split('\r\n')[0]).toBe(
      'timestamp,site.supplyUsedKw,site.curtailedKw,site.unservedKw,grid.importKw,grid.exportKw,ice-maker.on,ice-maker.powerKw,bess.chargeKw,bess.dischargeKw,bess.socKwh',
    );
  });
});

// How a CSV header reads as a quantity and a role (api/src/services/series-columns.ts, series-role-hints.ts).
import { describe, expect, it } from 'vitest';
import { columnQuantity, timeZoneFromHeader } from '../../api/src/services/series-columns';
import { suggestRoles } from '../../api/src/services/series-role-hints';

describe('the quantity a header names', () => {
  it.each([
    ['pv [kW]', { kind: 'power', sourceUnit: 'kW', unit: 'kW', factor: 1 }],
    ['Einspeisung (W)', { kind: 'power', sourceUnit: 'W', unit: 'kW', factor: 0.001 }],
    ['wind_MW', { kind: 'power', sourceUnit: 'MW', unit: 'kW', factor: 1000 }],
    ['import price [EUR/MWh]', { kind: 'price', sourceUnit: 'EUR/MWh', unit: 'per kWh', factor: 0.001 }],
    ['tariff (€/kWh)', { kind: 'price', sourceUnit: '€/kWh', unit: 'per kWh', factor: 1 }],
    ['price_eur_per_mwh', { kind: 'price', sourceUnit: 'eur per mwh', unit: 'per kWh', factor: 0.001 }],
    ['feed-in tariff', { kind: 'price', sourceUnit: 'per kWh', unit: 'per kWh', factor: 1 }],
    ['H2 offtake [kg/h]', { kind: 'rate', sourceUnit: 'kg/h', unit: 'kg/h', factor: 1 }],
  ])('%s', (header, quantity) => {
    expect(columnQuantity(header)).toEqual(quantity);
  });

  it('lets the unit option stand for powers only, never for a price or a rate', () => {
    expect(columnQuantity('pv', 'MW')).toMatchObject({ kind: 'power', factor: 1000 });
    expect(columnQuantity('pv [W]', 'kW')).toMatchObject({ kind: 'power', factor: 1 });
    expect(columnQuantity('price [EUR/MWh]', 'MW')).toMatchObject({ kind: 'price', factor: 0.001 });
    expect(columnQuantity('demand [m3/h]', 'W')).toMatchObject({ kind: 'rate', factor: 1 });
  });

  it('names no quantity for a header without a unit or a price word', () => {
    expect(columnQuantity('pv')).toBeNull();
    expect(columnQuantity('level [m]')).toBeNull();
  });

  it('reads an IANA zone from the timestamp header, and nothing else', () => {
    expect(timeZoneFromHeader('time (Europe/Vienna)')).toBe('Europe/Vienna');
    expect(timeZoneFromHeader('local time [UTC]')).toBe('UTC');
    expect(timeZoneFromHeader('time (Mars/Olympus)')).toBeNull();
    expect(timeZoneFromHeader('timestamp')).toBeNull();
  });
});

describe('the role a header suggests', () => {
  it('gives each role to the first column that names it, then falls back by kind', () => {
    expect(
      suggestRoles([
        { name: 'site load [kW]', kind: 'power' },
        { name: 'pv [kW]', kind: 'power' },
        { name: 'pv east [kW]', kind: 'power' },
        { name: 'export price [EUR/MWh]', kind: 'price' },
        { name: 'day-ahead [EUR/MWh]', kind: 'price' },
        { name: 'water [m3/h]', kind: 'rate' },
        { name: 'heat [kg/h]', kind: 'rate' },
      ]),
    ).toEqual(['siteLoad', 'supply', null, 'exportPrice', 'importPrice', 'storeDemand', null]);
    expect(suggestRoles([{ name: 'value [kW]', kind: 'power' }])).toEqual(['supply']);
  });
});

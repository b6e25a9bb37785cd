/**
 * What an uploaded series holds, and the part of a site spec it can fill. The API stores each
 * column of a CSV with its kind, suggests a role for it, and builds spec fields from the roles a
 * person or a client assigns; the console offers the same roles.
 */
export const SERIES_KINDS = ['power', 'price', 'rate'] as const;
/** `power` in kW, `price` in money per kWh, `rate` a product per hour (a store's demand, e.g. kg/h). */
export type SeriesKind = (typeof SERIES_KINDS)[number];

export const SERIES_ROLES = ['supply', 'siteLoad', 'importPrice', 'exportPrice', 'storeDemand', 'reserve'] as const;
export type SeriesRole = (typeof SERIES_ROLES)[number];

/** The kind of series each role takes: a price is never a power, and a store's demand is in its own unit. */
export const ROLE_KIND: Record<SeriesRole, SeriesKind> = {
  supply: 'power',
  siteLoad: 'power',
  importPrice: 'price',
  exportPrice: 'price',
  storeDemand: 'rate',
  reserve: 'power',
};

/** The spec field each role fills (a store's demand: the store the assignment names). */
export const ROLE_FIELD: Record<SeriesRole, string> = {
  supply: '/supply/seriesId',
  siteLoad: '/siteLoad/kw',
  importPrice: '/grid/importPrice',
  exportPrice: '/grid/exportPrice',
  storeDemand: '/stores/{store}/demandPerHour',
  reserve: '/reserve/upKw',
};

/** The unit a price series is stored in: money of the tenant's currency per kWh, as the spec's prices are. */
export const PRICE_UNIT = 'per kWh';

import { parse } from 'csv-parse/sync';
import { DateTime } from 'luxon';
import { CSV_DELIMITERS } from '../lib/csv-delimiters';
import { instantInRange } from '../lib/instants';
import { HttpProblem, type ProblemFieldError } from '../lib/problem';
import { columnQuantity, seriesValueRefusal, timeZoneFromHeader, type ColumnQuantity, type PowerUnit } from './series-columns';

/**
 * Reads a SCADA / historian CSV export: a timestamp column and value columns. Detects the
 * delimiter and a decimal comma, takes each column's quantity and unit from its header
 * (series-columns.ts; `unit` stands for the unit of every power column), and turns every
 * timestamp into an instant: with an offset as written, without one in the IANA zone the request
 * or the timestamp column's header names (`time (Europe/Vienna)`), where a repeated local hour
 * (clocks going back) is read in order and a skipped local time (clocks going forward) is an error.
 */
export interface CsvReadOptions {
  delimiter?: string;
  /** The IANA zone of timestamps without an offset; default: the one the timestamp column's header names. */
  timezone?: string;
  /** A luxon format for local timestamps that are not ISO 8601, e.g. `dd.MM.yyyy HH:mm`. */
  timestampFormat?: string;
  unit?: PowerUnit;
  timestampColumn?: string;
  columns?: string[];
}

export interface Sample {
  /** 1-based line number in the file (the header is line 1). */
  row: number;
  at: number;
  /** In the column's stored unit (kW, per kWh, the rate's own); null: the cell was empty. */
  value: number | null;
}

export interface CsvColumn {
  name: string;
  quantity: ColumnQuantity;
  samples: Sample[];
}

export interface CsvRead {
  delimiter: string;
  decimalComma: boolean;
  /** The offset of the first timestamp, e.g. `+01:00`, kept for the series' own start. */
  firstOffset: string;
  /** The IANA zone local timestamps were read in, or null when every timestamp carried its offset. */
  timeZone: string | null;
  timestampColumn: string;
  columns: CsvColumn[];
}

const MAX_REPORTED = 20;

export function detectDelimiter(headerLine: string): string {
  let best = ',';
  let bestCount = 0;
  for (const d of CSV_DELIMITERS) {
    const count = headerLine.split(d).length - 1;
    if (count > bestCount) {
      best = d;
      bestCount = count;
    }
  }
  return best;
}

const COMMA_DECIMAL = /^[+-]?\d{1,3}(\.\d{3})*,\d+$|^[+-]?\d+,\d+$/;
const POINT_DECIMAL = /^[+-]?\d+\.\d+$/;

function problem(errors: ProblemFieldError[], detail: string) {
  return new HttpProblem({ status: 400, slug: 'invalid-series-file', title: 'The CSV file cannot be read', detail, errors: errors.slice(0, MAX_REPORTED) });
}

const rowError = (row: number, message: string): ProblemFieldError => ({ pointer: '/file', message: `row ${row}: ${message}` });

export function readSeriesCsv(file: Buffer, opts: CsvReadOptions): CsvRead {
  const text = file.toString('utf8').replace(/^\uFEFF/, '');
  const headerLine = text.split(/\r?\n/, 1)[0] ?? '';
  const delimiter = opts.delimiter ?? detectDelimiter(headerLine);

  let records: { record: string[]; info: { lines: number } }[];
  try {
    records = parse(text, { delimiter, info: true, skip_empty_lines: true, trim: true }) as unknown as typeof records;
  } catch (err: any) {
    const row = typeof err?.lines === 'number' ? err.lines : null;
    const message = String(err?.message ?? 'malformed CSV').replace(/^Invalid Record Length: /, '');
    throw problem([row ? rowError(row, message) : { pointer: '/file', message }], row ? `Row ${row} is malformed: ${message}` : message);
  }
  if (records.length < 2) throw problem([{ pointer: '/file', message: 'needs a header row and at least one data row' }], 'The file has no data rows.');

  const header = records[0].record;
  const timestampColumn = opts.timestampColumn ?? header[0];
  const tsIndex = header.indexOf(timestampColumn);
  if (tsIndex < 0) throw problem([{ pointer: '/timestampColumn', message: `no column "${timestampColumn}" in the header` }], 'The timestamp column is missing.');
  const valueNames = opts.columns ?? header.filter((_, i) => i !== tsIndex);
  const valueIndexes = valueNames.map((name) => {
    const i = header.indexOf(name);
    if (i < 0 || i === tsIndex) throw problem([{ pointer: '/columns', message: `no value column "${name}" in the header` }], 'A value column is missing.');
    return i;
  });
  if (!valueIndexes.length) throw problem([{ pointer: '/file', message: 'has no value column' }], 'The file has only a timestamp column.');

  const quantities = valueNames.map((name) => {
    const quantity = columnQuantity(name, opts.unit);
    if (!quantity) {
      throw problem(
        [
          {
            pointer: '/unit',
            message: `column "${name}" names no unit; add [W], [kW] or [MW] for a power, [EUR/kWh] or [EUR/MWh] for a price, or [kg/h] (any product per hour) for a rate to the header, or pass unit`,
          },
        ],
        'A value column has no unit.',
      );
    }
    return quantity;
  });
  const timeZone = opts.timezone ?? timeZoneFromHeader(timestampColumn);

  const body = records.slice(1);
  const cells = body.flatMap((r) => valueIndexes.map((i) => r.record[i] ?? ''));
  const decimalComma = cells.some((c) => COMMA_DECIMAL.test(c)) && !cells.some((c) => POINT_DECIMAL.test(c)) && delimiter !== ',';

  const errors: ProblemFieldError[] = [];
  const instants: number[] = [];
  let firstOffset = '+00:00';
  let previous = -Infinity;
  for (const [k, r] of body.entries()) {
    const row = r.info.lines;
    const at = readTimestamp(r.record[tsIndex] ?? '', previous, { ...opts, timezone: timeZone ?? undefined });
    if (typeof at === 'string') {
      errors.push(rowError(row, at));
      instants.push(NaN);
      continue;
    }
    if (k === 0) firstOffset = at.offset;
    if (at.ms <= previous) errors.push(rowError(row, `timestamp ${r.record[tsIndex]} is not after the previous row's`));
    previous = Math.max(previous, at.ms);
    instants.push(at.ms);
  }

  const columns: CsvColumn[] = valueNames.map((name, c) => ({ name, quantity: quantities[c], samples: [] }));
  for (const [k, r] of body.entries()) {
    const row = r.info.lines;
    for (const [c, i] of valueIndexes.entries()) {
      const raw = (r.record[i] ?? '').trim();
      const { kind, sourceUnit, unit, factor } = quantities[c];
      let value: number | null = null;
      if (raw !== '') {
        const normalised = decimalComma ? raw.replace(/\./g, '').replace(',', '.') : raw;
        const written = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/.test(normalised) ? Number(normalised) : NaN;
        if (!Number.isFinite(written)) {
          errors.push(rowError(row, `column "${valueNames[c]}": "${raw}" is not a number`));
          continue;
        }
        if (written < 0 && kind === 'power') {
          errors.push(rowError(row, `column "${valueNames[c]}": ${raw} is negative; a power per step is at least 0`));
          continue;
        }
        value = written * factor;
        const refusal = seriesValueRefusal(kind, value, unit);
        if (refusal) {
          errors.push(rowError(row, `column "${valueNames[c]}": ${raw} ${sourceUnit}${factor === 1 ? '' : ` (${value} ${unit})`} ${refusal}`));
          continue;
        }
      }
      columns[c].samples.push({ row, at: instants[k], value });
    }
  }
  if (errors.length) throw problem(errors, `${errors.length} row${errors.length === 1 ? '' : 's'} cannot be read: ${errors.slice(0, 3).map((e) => e.message).join('; ')}`);
  return { delimiter, decimalComma, firstOffset, timeZone, timestampColumn, columns };
}

const HAS_OFFSET = /(Z|[+-]\d{2}(:?\d{2})?)$/i;

/** An instant in ms and its offset, or a message saying why the cell is not one. */
function readTimestamp(raw: string, previous: number, opts: CsvReadOptions): { ms: number; offset: string } | string {
  const text = raw.trim();
  if (!opts.timestampFormat && HAS_OFFSET.test(text)) {
    const dt = DateTime.fromISO(text.replace(' ', 'T'), { setZone: true });
    if (!dt.isValid) return `timestamp "${raw}" is not ISO 8601`;
    const inRange = instantInRange(dt);
    if (!inRange.ok) return `timestamp "${raw}": ${inRange.reason}`;
    return { ms: dt.toMillis(), offset: dt.toFormat('ZZ') };
  }
  if (!opts.timezone) return `timestamp "${raw}" has no UTC offset; pass timezone (an IANA zone such as Europe/Berlin) to read local times`;
  const wall = opts.timestampFormat
    ? DateTime.fromFormat(text, opts.timestampFormat, { zone: 'UTC' })
    : DateTime.fromISO(text.replace(' ', 'T'), { zone: 'UTC' });
  if (!wall.isValid) return `timestamp "${raw}" is not ${opts.timestampFormat ? `in the format ${opts.timestampFormat}` : 'ISO 8601'}`;
  const fields = { year: wall.year, month: wall.month, day: wall.day, hour: wall.hour, minute: wall.minute, second: wall.second };
  const local = DateTime.fromObject(fields, { zone: opts.timezone });
  if (!local.isValid) return `time zone "${opts.timezone}" is not an IANA zone`;
  if (local.hour !== wall.hour || local.minute !== wall.minute) {
    return `local time ${text} does not exist in ${opts.timezone} (the clocks skip it)`;
  }
  // A repeated hour (clocks going back) gives one wall time two instants; a file in time order
  // means the first occurrence until the rows have passed it, then the second.
  const sameWall = (d: DateTime) => d.hour === local.hour && d.minute === local.minute && d.offset !== local.offset;
  const candidates = [local.minus({ hours: 1 }), local, local.plus({ hours: 1 })].filter((d) => d === local || sameWall(d));
  const chosen = candidates.find((d) => d.toMillis() > previous) ?? local;
  const inRange = instantInRange(chosen);
  if (!inRange.ok) return `timestamp "${raw}": ${inRange.reason}`;
  return { ms: chosen.toMillis(), offset: chosen.toFormat('ZZ') };
}

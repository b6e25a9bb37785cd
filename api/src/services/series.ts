import { DateTime } from 'luxon';
import type { AppContext } from '../context';
import { Series } from '../db/entities/series';
import { notFound } from '../lib/problem';
import { readSeriesCsv, type CsvReadOptions } from './series-csv';
import { defaultStepMinutes, resample, type FillPolicy } from './series-resample';

export interface SeriesUploadOptions extends CsvReadOptions {
  stepMinutes?: number;
  fill?: FillPolicy;
  name?: string;
}

/** One series per value column of the file, all stored in one transaction or none. */
export async function uploadSeries(
  ctx: AppContext,
  tenantId: string,
  file: { buffer: Buffer; originalname?: string },
  opts: SeriesUploadOptions,
): Promise<Series[]> {
  const read = readSeriesCsv(file.buffer, opts);
  const fill = opts.fill ?? 'none';
  const prepared = read.columns.map((column) => {
    const stepMinutes = opts.stepMinutes ?? defaultStepMinutes(column.samples);
    return { column, stepMinutes, r: resample(column.samples, { stepMinutes, fill, column: column.name, offset: read.firstOffset }) };
  });
  return ctx.db.transaction(async (manager) => {
    const saved: Series[] = [];
    for (const { column, r } of prepared) {
      const baseName = opts.name ?? file.originalname?.replace(/\.csv$/i, '') ?? 'series';
      const [row] = await manager.query(
        `INSERT INTO series (tenant_id, name, source_filename, source_column, source_unit, start, start_offset, step_minutes, steps, values_kw, source_rows, filled, fill_policy)
         VALUES ($1, $2, $3, $4, $5, $6, $7, $8, $9, $10, $11, $12, $13) RETURNING id`,
        [
          tenantId,
          read.columns.length > 1 ? `${baseName} · ${column.name}` : baseName,
          file.originalname ?? null,
          column.name,
          column.unit,
          new Date(r.startMs),
          read.firstOffset,
          r.stepMinutes,
          r.valuesKw.length,
          JSON.stringify(r.valuesKw),
          column.samples.length,
          JSON.stringify(r.filled),
          fill,
        ],
      );
      saved.push(await manager.findOneByOrFail(Series, { id: row.id }));
    }
    return saved;
  });
}

export async function getSeries(ctx: AppContext, tenantId: string, id: string): Promise<Series> {
  const series = /^ser_[0-9a-f]{32}$/.test(id) ? await ctx.db.manager.findOneBy(Series, { id, tenantId }) : null;
  if (!series) throw notFound(`Series ${id}`);
  return series;
}

export function listSeries(ctx: AppContext, tenantId: string, limit = 100) {
  return ctx.db.manager.find(Series, {
    where: { tenantId },
    order: { createdAt: 'DESC', id: 'DESC' },
    take: limit,
    // The values stay out of lists; GET /v1/series/{id} returns them.
    select: { id: true, tenantId: true, createdAt: true, name: true, sourceFilename: true, sourceColumn: true, sourceUnit: true, start: true, startOffset: true, stepMinutes: true, steps: true, sourceRows: true, filled: true, fillPolicy: true },
  });
}

export function seriesSummary(s: Series) {
  const zone = s.startOffset === '+00:00' ? 'UTC' : `UTC${s.startOffset}`;
  const start = DateTime.fromJSDate(s.start, { zone });
  return {
    id: s.id,
    name: s.name,
    createdAt: s.createdAt.toISOString(),
    sourceFilename: s.sourceFilename,
    column: s.sourceColumn,
    sourceUnit: s.sourceUnit,
    unit: 'kW',
    start: start.toISO({ suppressMilliseconds: true }),
    end: start.plus({ minutes: s.steps * s.stepMinutes }).toISO({ suppressMilliseconds: true }),
    stepMinutes: s.stepMinutes,
    steps: s.steps,
    sourceRows: s.sourceRows,
    fillPolicy: s.fillPolicy,
    filled: s.filled,
    filledSteps: s.filled.reduce((n, f) => n + f.toStep - f.fromStep + 1, 0),
    links: { self: `/v1/series/${s.id}` },
  };
}

export const seriesDetail = (s: Series) => ({ ...seriesSummary(s), valuesKw: s.valuesKw });

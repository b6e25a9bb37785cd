import { randomUUID } from 'node:crypto';
import type { AppContext } from '../context';
import { Series } from '../db/entities/series';
import { notFound } from '../lib/problem';
import { readSeriesCsv, type CsvReadOptions } from './series-csv';
import { instantIn, offeredHorizon, seriesEndMs, seriesZone, type OfferedHorizon } from './series-horizon';
import { defaultStepMinutes, resample, type FillPolicy } from './series-resample';
import { suggestRoles } from './series-role-hints';

export interface SeriesUploadOptions extends CsvReadOptions {
  stepMinutes?: number;
  fill?: FillPolicy;
  name?: string;
}

export interface SeriesUpload {
  uploadId: string;
  series: Series[];
  /** The horizon the file offers: the steps all its columns cover. */
  horizon: OfferedHorizon | null;
}

/** One series per value column of the file, all stored in one transaction or none. */
export async function uploadSeries(
  ctx: AppContext,
  tenantId: string,
  file: { buffer: Buffer; originalname?: string },
  opts: SeriesUploadOptions,
): Promise<SeriesUpload> {
  const read = readSeriesCsv(file.buffer, opts);
  const fill = opts.fill ?? 'none';
  const prepared = read.columns.map((column) => {
    const stepMinutes = opts.stepMinutes ?? defaultStepMinutes(column.samples);
    return { column, r: resample(column.samples, { stepMinutes, fill, column: column.name, offset: read.firstOffset }) };
  });
  const roles = suggestRoles(read.columns.map((c) => ({ name: c.name, kind: c.quantity.kind })));
  const uploadId = randomUUID();
  const baseName = opts.name ?? file.originalname?.replace(/\.csv$/i, '') ?? 'series';
  const series = await ctx.db.transaction(async (manager) => {
    const saved: Series[] = [];
    for (const [i, { column, r }] of prepared.entries()) {
      const [row] = await manager.query(
        `INSERT INTO series (tenant_id, name, source_filename, source_column, source_unit, kind, unit, start, start_offset, time_zone,
                             step_minutes, steps, step_values, source_rows, filled, fill_policy, upload_id, column_index, suggested_role)
         VALUES ($1, $2, $3, $4, $5, $6, $7, $8, $9, $10, $11, $12, $13, $14, $15, $16, $17, $18, $19) RETURNING id`,
        [
          tenantId,
          read.columns.length > 1 ? `${baseName} · ${column.name}` : baseName,
          file.originalname ?? null,
          column.name,
          column.quantity.sourceUnit,
          column.quantity.kind,
          column.quantity.unit,
          new Date(r.startMs),
          read.firstOffset,
          read.timeZone,
          r.stepMinutes,
          r.values.length,
          JSON.stringify(r.values),
          column.samples.length,
          JSON.stringify(r.filled),
          fill,
          uploadId,
          i,
          roles[i],
        ],
      );
      saved.push(await manager.findOneByOrFail(Series, { id: row.id }));
    }
    return saved;
  });
  return { uploadId, series, horizon: offeredHorizon(series) };
}

export async function getSeries(ctx: AppContext, tenantId: string, id: string): Promise<Series> {
  const series = /^ser_[0-9a-f]{32}$/.test(id) ? await ctx.db.manager.findOneBy(Series, { id, tenantId }) : null;
  if (!series) throw notFound(`Series ${id}`);
  return series;
}

export function listSeries(ctx: AppContext, tenantId: string, limit = 100) {
  return ctx.db.manager.find(Series, {
    where: { tenantId },
    // Newest upload first, the columns of a file in the file's order.
    order: { createdAt: 'DESC', uploadId: 'ASC', columnIndex: 'ASC', id: 'DESC' },
    take: limit,
    // The values stay out of lists; GET /v1/series/{id} returns them.
    select: {
      id: true, tenantId: true, createdAt: true, name: true, sourceFilename: true, sourceColumn: true, sourceUnit: true, kind: true, unit: true,
      start: true, startOffset: true, timeZone: true, stepMinutes: true, steps: true, sourceRows: true, filled: true, fillPolicy: true,
      uploadId: true, columnIndex: true, suggestedRole: true,
    },
  });
}

export function seriesSummary(s: Series) {
  const zone = seriesZone(s);
  return {
    id: s.id,
    name: s.name,
    createdAt: s.createdAt.toISOString(),
    sourceFilename: s.sourceFilename,
    column: s.sourceColumn,
    kind: s.kind,
    sourceUnit: s.sourceUnit,
    unit: s.unit,
    suggestedRole: s.suggestedRole,
    uploadId: s.uploadId,
    start: instantIn(s.start.getTime(), zone),
    end: instantIn(seriesEndMs(s), zone),
    timeZone: s.timeZone,
    stepMinutes: s.stepMinutes,
    steps: s.steps,
    sourceRows: s.sourceRows,
    fillPolicy: s.fillPolicy,
    filled: s.filled,
    filledSteps: s.filled.reduce((n, f) => n + f.toStep - f.fromStep + 1, 0),
    links: { self: `/v1/series/${s.id}` },
  };
}

/** A power keeps `valuesKw`, the field the series detail had when every series was one. */
export const seriesDetail = (s: Series) => ({ ...seriesSummary(s), values: s.values, ...(s.kind === 'power' ? { valuesKw: s.values } : {}) });

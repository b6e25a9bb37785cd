import type { UploadedSeries } from '../api';

/** The columns of one uploaded file, and the steps they all cover: what a spec's horizon becomes. */
export interface SeriesUpload {
  key: string;
  name: string;
  createdAt: string;
  columns: UploadedSeries[];
  stepMinutes: number;
  /** Steps every column covers; 0 when they step differently or do not overlap. */
  steps: number;
  start: string;
  end: string;
  timeZone: string | null;
}

const MINUTE = 60_000;

/** The file a column came from: its upload name without the ` · column` suffix the API adds for files of several columns. */
const fileName = (s: UploadedSeries) => (s.name ?? '').replace(/ · [^·]*$/, '') || s.sourceFilename || s.id || 'series';

/** Series grouped by the upload they came from, in the list's order: newest upload first, columns in file order. */
export function groupUploads(series: UploadedSeries[]): SeriesUpload[] {
  const groups = new Map<string, UploadedSeries[]>();
  for (const s of series) {
    const key = s.uploadId ?? s.id ?? '';
    groups.set(key, [...(groups.get(key) ?? []), s]);
  }
  return [...groups.entries()].map(([key, columns]) => {
    const startMs = Math.max(...columns.map((c) => Date.parse(c.start ?? '')));
    const endMs = Math.min(...columns.map((c) => Date.parse(c.end ?? '')));
    const stepMinutes = columns[0].stepMinutes ?? 60;
    const sameStep = columns.every((c) => c.stepMinutes === stepMinutes);
    const steps = sameStep && endMs > startMs ? Math.floor((endMs - startMs) / (stepMinutes * MINUTE)) : 0;
    const startsLast = columns.find((c) => Date.parse(c.start ?? '') === startMs) ?? columns[0];
    const endsFirst = columns.find((c) => Date.parse(c.end ?? '') === endMs) ?? columns[0];
    return {
      key,
      name: fileName(columns[0]),
      createdAt: columns[0].createdAt ?? '',
      columns,
      stepMinutes,
      steps,
      start: startsLast.start ?? '',
      end: endsFirst.end ?? '',
      timeZone: columns.find((c) => c.timeZone)?.timeZone ?? null,
    };
  });
}

/**
 * The window of an upload to build from when the spec keeps its own horizon: its start and steps,
 * taken from the file. Null when the spec has no horizon to keep, or one of another step length
 * (the file's steps would then span another stretch of time).
 */
export function keptHorizonWindow(spec: unknown, upload: SeriesUpload): { start: string; steps: number } | null {
  const horizon = (spec as { horizon?: { start?: unknown; steps?: unknown; stepMinutes?: unknown } } | null)?.horizon;
  if (typeof horizon?.start !== 'string' || typeof horizon.steps !== 'number') return null;
  return horizon.stepMinutes === upload.stepMinutes ? { start: horizon.start, steps: horizon.steps } : null;
}

import { describe, expect, it } from 'vitest';
import type { UploadedSeries } from '../api';
import { groupUploads, keptHorizonWindow } from './series-uploads';

const column = (over: Partial<UploadedSeries>): UploadedSeries => ({
  id: 'ser_x',
  name: 'yard · pv [kW]',
  createdAt: '2027-06-01T10:00:00.000Z',
  start: '2027-06-01T00:00:00+01:00',
  end: '2027-06-03T00:00:00+01:00',
  stepMinutes: 60,
  steps: 48,
  timeZone: 'Europe/Lisbon',
  ...over,
});

describe('groupUploads', () => {
  it('groups the columns of one file, in file order, with the steps they all cover', () => {
    // As GET /v1/series lists them: newest upload first, a file's columns in order.
    const list = [
      column({ id: 'ser_a', name: 'yard · pv [kW]', uploadId: 'u1' }),
      column({ id: 'ser_b', name: 'yard · load [kW]', uploadId: 'u1', start: '2027-06-01T01:00:00+01:00' }),
      column({ id: 'ser_old', name: 'older', uploadId: null, createdAt: '2027-05-01T10:00:00.000Z', timeZone: null }),
    ];
    const [yard, older] = groupUploads(list);
    expect(yard).toMatchObject({ key: 'u1', name: 'yard', steps: 47, start: '2027-06-01T01:00:00+01:00', end: '2027-06-03T00:00:00+01:00', timeZone: 'Europe/Lisbon' });
    expect(yard.columns.map((c) => c.id)).toEqual(['ser_a', 'ser_b']);
    expect(older).toMatchObject({ key: 'ser_old', name: 'older', steps: 48, timeZone: null });
  });

  it('offers no steps for columns that step differently', () => {
    const [mixed] = groupUploads([column({ id: 'a', uploadId: 'u' }), column({ id: 'b', uploadId: 'u', stepMinutes: 15 })]);
    expect(mixed.steps).toBe(0);
  });
});

describe('keptHorizonWindow', () => {
  const [upload] = groupUploads([column({ uploadId: 'u' })]);

  it("takes the spec's own start and steps when it steps as the file does", () => {
    const spec = { horizon: { start: '2027-06-01T06:00:00+01:00', stepMinutes: 60, steps: 24, timeZone: 'Europe/Lisbon' } };
    expect(keptHorizonWindow(spec, upload)).toEqual({ start: '2027-06-01T06:00:00+01:00', steps: 24 });
  });

  it('keeps nothing from a spec of another step length or without a horizon', () => {
    expect(keptHorizonWindow({ horizon: { start: '2027-06-01T06:00:00+01:00', stepMinutes: 15, steps: 96 } }, upload)).toBeNull();
    expect(keptHorizonWindow({}, upload)).toBeNull();
    expect(keptHorizonWindow(null, upload)).toBeNull();
  });
});

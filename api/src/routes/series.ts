import type { RequestHandler, Router } from 'express';
import multer from 'multer';
import { authenticate, authorize } from '../auth/middleware';
import type { AppContext } from '../context';
import { strictRouter } from '../lib/strict-router';
import { delimiterNamed } from '../lib/csv-delimiters';
import { HttpProblem, validationProblem } from '../lib/problem';
import { getSeries, listSeries, seriesDetail, seriesSummary, uploadSeries } from '../services/series';
import type { PowerUnit } from '../services/series-columns';
import { draftSpecFromSeries } from '../services/series-spec-draft';
import type { FillPolicy } from '../services/series-resample';

/**
 * multer reads the multipart body here, after authentication, because the OpenAPI validator runs
 * with `fileUploader: false`: the validator checks the content type and the query parameters
 * (all upload options are query parameters), this route checks the `file` part itself.
 */
function singleCsvFile(ctx: AppContext): RequestHandler {
  const upload = multer({ storage: multer.memoryStorage(), limits: { fileSize: ctx.config.seriesMaxBytes, files: 1, fields: 10, parts: 12 } }).single('file');
  return (req, res, next) => {
    upload(req, res, (err: unknown) => {
      if (!err) return next();
      if (err instanceof multer.MulterError && err.code === 'LIMIT_FILE_SIZE') {
        return next(
          new HttpProblem({
            status: 413,
            slug: 'payload-too-large',
            title: 'File too large',
            detail: `The file exceeds the upload limit of ${ctx.config.seriesMaxBytes} bytes.`,
            errors: [{ pointer: '/file', message: `larger than ${ctx.config.seriesMaxBytes} bytes` }],
          }),
        );
      }
      if (err instanceof multer.MulterError) return next(validationProblem([{ pointer: `/${err.field ?? 'file'}`, message: err.message }]));
      // Anything else multer reports is the body's framing (no boundary, a truncated part).
      next(validationProblem([{ pointer: '/file', message: `malformed multipart body: ${(err as Error).message}` }]));
    });
  };
}

export function seriesRouter(ctx: AppContext): Router {
  const r = strictRouter();
  const auth = authenticate(ctx);

  r.post('/v1/series', auth, authorize('series.create'), singleCsvFile(ctx), async (req, res) => {
    if (!req.file) throw validationProblem([{ pointer: '/file', message: 'a multipart part named "file" with the CSV is required' }]);
    const q = req.query as Record<string, string | undefined>;
    const upload = await uploadSeries(ctx, req.principal!.tenantId, req.file, {
      stepMinutes: q.stepMinutes ? Number(q.stepMinutes) : undefined,
      timezone: q.timezone,
      timestampFormat: q.timestampFormat,
      unit: q.unit as PowerUnit | undefined,
      fill: q.fill as FillPolicy | undefined,
      delimiter: q.delimiter ? delimiterNamed(q.delimiter) : undefined,
      timestampColumn: q.timestampColumn,
      columns: q.columns ? q.columns.split(',') : undefined,
      name: q.name,
    });
    res
      .status(201)
      .location(`/v1/series/${upload.series[0].id}`)
      .json({ items: upload.series.map(seriesSummary), uploadId: upload.uploadId, horizon: upload.horizon });
  });

  r.post('/v1/series/spec-draft', auth, authorize('series.read'), async (req, res) => {
    const { assignments, horizon, base } = req.body;
    res.json(await draftSpecFromSeries(ctx, req.principal!.tenantId, { assignments, horizon, base }));
  });

  r.get('/v1/series', auth, authorize('series.read'), async (req, res) => {
    res.json({ items: (await listSeries(ctx, req.principal!.tenantId)).map(seriesSummary) });
  });

  r.get('/v1/series/:seriesId', auth, authorize('series.read'), async (req, res) => {
    res.json(seriesDetail(await getSeries(ctx, req.principal!.tenantId, String(req.params.seriesId))));
  });

  return r;
}

// One log line per answered request, and the request id every answer carries.
import { Writable } from 'node:stream';
import express from 'express';
import { pino } from 'pino';
import request from 'supertest';
import { describe, expect, it } from 'vitest';
import { requestLog } from '../../api/src/lib/request-log';

function appWithLog() {
  const lines: Record<string, unknown>[] = [];
  const sink = new Writable({
    write(chunk: Buffer, _encoding, done) {
      lines.push(JSON.parse(chunk.toString()));
      done();
    },
  });
  const app = express();
  app.use(requestLog(pino(sink), { ignore: (url) => url === '/healthz' }));
  app.get('/ok', (req, res) => {
    res.json({ id: req.id });
  });
  app.get('/broken', (_req, res) => {
    res.status(503).end();
  });
  app.get('/healthz', (_req, res) => {
    res.end();
  });
  return { app, lines };
}

describe('request log', () => {
  it('echoes a well-formed X-Request-Id and logs the answer under it', async () => {
    const { app, lines } = appWithLog();
    const res = await request(app).get('/ok?x=1').set('X-Request-Id', 'trace-42.a').expect(200);
    expect(res.headers['x-request-id']).toBe('trace-42.a');
    expect(res.body.id).toBe('trace-42.a');
    expect(lines).toEqual([expect.objectContaining({ level: 30, msg: 'request completed', reqId: 'trace-42.a', method: 'GET', url: '/ok?x=1', status: 200 })]);
    expect(lines[0]!.ms).toEqual(expect.any(Number));
  });

  it('replaces a malformed id with a UUID, logs a 5xx at error, and skips ignored paths', async () => {
    const { app, lines } = appWithLog();
    const res = await request(app).get('/broken').set('X-Request-Id', 'no spaces <allowed>').expect(503);
    expect(res.headers['x-request-id']).toMatch(/^[0-9a-f-]{36}$/);
    await request(app).get('/healthz').expect(200);
    expect(lines).toEqual([expect.objectContaining({ level: 50, msg: 'request failed', reqId: res.headers['x-request-id'], status: 503 })]);
  });
});

import { createServer, type IncomingHttpHeaders, type Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import { afterAll, beforeAll, beforeEach, describe, expect, it, vi } from 'vitest';
import { ApiProblem } from './api-problem';

// The client is browser code: it reads the page's origin and the CSRF cookie, which the test stubs as a
// page would hold them. The requests are real, to a loopback server that answers the way the API does.
interface SeenRequest {
  method: string;
  url: string;
  headers: IncomingHttpHeaders;
  body: string;
}

const page = { cookie: '' };
const seen: SeenRequest[] = [];
let server: Server;
let client: typeof import('./api-client');

const answers: Record<string, { status: number; type: string; body: string }> = {
  'GET /v1/plans': { status: 200, type: 'application/json', body: JSON.stringify({ items: [] }) },
  'GET /v1/runs': { status: 200, type: 'application/json', body: JSON.stringify({ items: [], nextCursor: null }) },
  'POST /v1/runs/r-1/cancel': { status: 202, type: 'application/json', body: JSON.stringify({ id: 'r-1', status: 'running' }) },
  // RFC 9457 §3: type, title, status, detail, plus the extension member `errors` this API adds.
  'GET /v1/runs/r-missing': {
    status: 404,
    type: 'application/problem+json',
    body: JSON.stringify({ type: 'https://gridwright.example/problems/not-found', title: 'Not found', status: 404, detail: 'No run r-missing.', errors: [{ pointer: '/runId', message: 'unknown run' }] }),
  },
  'GET /v1/usage': { status: 502, type: 'text/plain', body: 'upstream unavailable' },
  'POST /v1/series': { status: 201, type: 'application/json', body: JSON.stringify({ items: [{ id: 's-1', column: 'pv' }] }) },
};

beforeAll(async () => {
  server = createServer((req, res) => {
    const chunks: Buffer[] = [];
    req.on('data', (c: Buffer) => chunks.push(c));
    req.on('end', () => {
      seen.push({ method: req.method ?? '', url: req.url ?? '', headers: req.headers, body: Buffer.concat(chunks).toString('utf8') });
      const answer = answers[`${req.method} ${new URL(req.url ?? '/', 'http://x').pathname}`] ?? { status: 500, type: 'text/plain', body: 'unexpected request' };
      res.writeHead(answer.status, { 'content-type': answer.type }).end(answer.body);
    });
  });
  await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
  vi.stubGlobal('window', { location: { origin: `http://127.0.0.1:${(server.address() as AddressInfo).port}` } });
  vi.stubGlobal('document', page);
  client = await import('./api-client');
});

afterAll(async () => {
  vi.unstubAllGlobals();
  await new Promise((resolve) => server.close(resolve));
});

beforeEach(() => {
  seen.length = 0;
  page.cookie = '';
  client.rememberCsrfToken(null);
});

describe('the API client', () => {
  it('sends the CSRF token with changes and not with reads', async () => {
    const { api, rememberCsrfToken, unwrap } = client;
    rememberCsrfToken('token-from-session');
    await unwrap(api.GET('/v1/plans'));
    await unwrap(api.POST('/v1/runs/{runId}/cancel', { params: { path: { runId: 'r-1' } } }));
    expect(seen.map((r) => [r.method, r.headers['x-csrf-token']])).toEqual([
      ['GET', undefined],
      ['POST', 'token-from-session'],
    ]);
  });

  it("takes the token from the page's cookie when there is one (after a reload)", async () => {
    const { api, rememberCsrfToken, unwrap } = client;
    rememberCsrfToken('token-from-session');
    page.cookie = 'theme=dark; gw_csrf=from%2Fcookie';
    await unwrap(api.POST('/v1/runs/{runId}/cancel', { params: { path: { runId: 'r-1' } } }));
    expect(seen[0].headers['x-csrf-token']).toBe('from/cookie');
  });

  it('leaves out query parameters that are not set', async () => {
    const { api, unwrap } = client;
    await unwrap(api.GET('/v1/runs', { params: { query: { status: undefined, cursor: undefined, limit: 50 } } }));
    expect(seen[0].url).toBe('/v1/runs?limit=50');
  });

  it('turns a problem+json answer into an ApiProblem with its field errors', async () => {
    const { api, unwrap } = client;
    const error = await unwrap(api.GET('/v1/runs/{runId}', { params: { path: { runId: 'r-missing' } } })).catch((e: unknown) => e);
    expect(error).toBeInstanceOf(ApiProblem);
    expect(error).toMatchObject({ status: 404, title: 'Not found', detail: 'No run r-missing.', errors: [{ pointer: '/runId', message: 'unknown run' }] });
  });

  it('keeps the text of an answer that is not problem+json as the detail', async () => {
    const { api, unwrap } = client;
    const error = await unwrap(api.GET('/v1/usage')).catch((e: unknown) => e);
    expect(error).toBeInstanceOf(ApiProblem);
    expect(error).toMatchObject({ status: 502, detail: 'upstream unavailable' });
  });

  it('uploads a file as multipart, with the options in the query and the CSRF token', async () => {
    const { api, multipartBody, rememberCsrfToken, unwrap } = client;
    rememberCsrfToken('token-from-session');
    const file = new File(['timestamp,pv\n2027-03-01T00:00:00Z,12.5\n'], 'roof.csv', { type: 'text/csv' });
    const body = await unwrap(
      api.POST('/v1/series', { params: { query: { name: 'roof pv' } }, body: { file: file as unknown as string }, bodySerializer: multipartBody }),
    );
    expect(body.items.map((s) => s.id)).toEqual(['s-1']);
    const [request] = seen;
    expect(request.url).toBe('/v1/series?name=roof%20pv');
    expect(request.headers['x-csrf-token']).toBe('token-from-session');
    const boundary = /^multipart\/form-data; boundary=(.+)$/.exec(request.headers['content-type'] ?? '')?.[1];
    expect(boundary).toBeTruthy();
    // RFC 7578 §4.2: the part names the form field and the file.
    expect(request.body).toContain('Content-Disposition: form-data; name="file"; filename="roof.csv"');
    expect(request.body).toContain('timestamp,pv\n2027-03-01T00:00:00Z,12.5\n');
  });
});

// Link header syntax per RFC 8288 §3 (target in angle brackets, then `; rel="next"`).
describe('nextCursorFromLink', () => {
  it('finds the cursor of the next page among several links', () => {
    const link = '</v1/runs?limit=50>; rel="first", </v1/runs?limit=50&cursor=eyJhIjoxfQ>; rel="next"';
    expect(client.nextCursorFromLink(link)).toBe('eyJhIjoxfQ');
  });

  it('is null without a next link', () => {
    expect(client.nextCursorFromLink(null)).toBeNull();
    expect(client.nextCursorFromLink('</v1/runs>; rel="prev"')).toBeNull();
  });
});

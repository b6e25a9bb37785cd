import fc from 'fast-check';
import request from 'supertest';
import { expect } from 'vitest';
import type { TestApp } from '../../support/test-app';
import { fuzzRuns, fuzzSeed } from './fuzz-runs';
import { expectCleanRefusal } from './problem-assertions';
import { changedTables, rowCounts } from './row-counts';

/** Rate-limit counters change on every authenticated request, refused or not: bookkeeping, not data. */
const BOOKKEEPING = ['public.rate_limits'];

export interface FuzzTarget {
  t: TestApp;
  apiKey: string;
  path: string;
}

/**
 * Sends each generated JSON body to `path`: never a 5xx, every refusal problem+json with pointers,
 * and a refused request leaves every table's row count as it was.
 */
export async function fuzzJsonBodies(target: FuzzTarget, bodies: fc.Arbitrary<unknown>, opts: { runs: number; seed: number }) {
  await fc.assert(
    fc.asyncProperty(bodies, async (body) => {
      const before = await rowCounts(target.t.ctx.db);
      const res = await request(target.t.app)
        .post(target.path)
        .set('Authorization', `Bearer ${target.apiKey}`)
        .set('Content-Type', 'application/json')
        .send(JSON.stringify(body) ?? 'null');
      expectCleanRefusal(res, `POST ${target.path}`);
      if (res.status >= 400) expect(changedTables(before, await rowCounts(target.t.ctx.db), BOOKKEEPING), 'tables changed by a refused request').toEqual([]);
    }),
    { numRuns: fuzzRuns(opts.runs), seed: fuzzSeed(opts.seed) },
  );
}

/** Sends raw (often not JSON) bodies under assorted content types. */
export async function fuzzRawBodies(target: FuzzTarget, bodies: fc.Arbitrary<{ contentType: string; body: string }>, opts: { runs: number; seed: number }) {
  await fc.assert(
    fc.asyncProperty(bodies, async ({ contentType, body }) => {
      const before = await rowCounts(target.t.ctx.db);
      const res = await request(target.t.app).post(target.path).set('Authorization', `Bearer ${target.apiKey}`).set('Content-Type', contentType).send(body);
      expectCleanRefusal(res, `POST ${target.path} as ${contentType}`);
      if (res.status >= 400) expect(changedTables(before, await rowCounts(target.t.ctx.db), BOOKKEEPING), 'tables changed by a refused request').toEqual([]);
    }),
    { numRuns: fuzzRuns(opts.runs), seed: fuzzSeed(opts.seed) },
  );
}

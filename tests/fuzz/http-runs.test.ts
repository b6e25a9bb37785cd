// POST /v1/runs and POST /v1/specs/validate under fuzzing: random and mutated site specs, wrong
// types, non-finite numbers spelled as strings, huge arrays, deep nesting, unicode ids, truncated
// JSON and wrong content types. Never a 5xx; refusals are problem+json with pointers; a refused
// request writes nothing.
import fc from 'fast-check';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTenantWithKey } from '../support/tenants';
import { startTestApp, type TestApp } from '../support/test-app';
import { fuzzJsonBodies, fuzzRawBodies } from './support/http-fuzz';
import { mutatedSpecArb, rawBodyArb } from './support/spec-arbitraries';

describe.each(['/v1/runs', '/v1/specs/validate'])('POST %s under fuzzing', (path) => {
  let t: TestApp;
  let apiKey: string;
  beforeAll(async () => {
    // The long window keeps the fuzzer inside the rate limit; the limit itself is API4's business.
    t = await startTestApp({ RATE_LIMIT_WINDOW_SECONDS: '3600' });
    ({ apiKey } = await createTenantWithKey(t.ctx));
  });
  afterAll(async () => t.close());

  it('refuses mutated specs cleanly', async () => {
    await fuzzJsonBodies({ t, apiKey, path }, mutatedSpecArb(), { runs: 50, seed: 7201 });
  });

  it('escapes an unknown property name in its pointer (RFC 6901; found by this fuzzer)', async () => {
    const res = await request(t.app).post(path).set('Authorization', `Bearer ${apiKey}`).send({ 'a/b~c': 1 });
    expect(res.status).toBe(400);
    expect(res.body.errors.map((e: { pointer: string }) => e.pointer)).toContain('/a~1b~0c');
  });

  it('refuses arbitrary JSON values cleanly', async () => {
    await fuzzJsonBodies({ t, apiKey, path }, fc.jsonValue({ maxDepth: 4 }), { runs: 30, seed: 7202 });
  });

  it('refuses truncated JSON, non-JSON and wrong content types cleanly', async () => {
    await fuzzRawBodies({ t, apiKey, path }, rawBodyArb(), { runs: 60, seed: 7203 });
  });
});

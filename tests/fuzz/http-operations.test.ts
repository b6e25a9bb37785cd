// Every JSON body the API takes, under fuzzing: each operation of openapi.yaml with a JSON body is
// sent its documented example with one property replaced by an arbitrary JSON value, with a
// privileged or unknown property planted (ids, tenants, roles, scopes, plan overrides, __proto__),
// or an arbitrary JSON value for the whole body — as the caller its permission needs, on the
// documented path and on other spellings of it. Never a 5xx; refusals are problem+json naming
// fields; another spelling never reaches a handler; a refused request writes nothing.
import fc from 'fast-check';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { apiOperations, fillPath, loadOpenApi } from '../security/support/openapi-operations';
import { exampleBody, sendTo, unknownIds } from '../security/support/operation-requests';
import { otherSpellings } from '../security/support/route-spellings';
import { fixtureValues, startAppWithResources, type AppWithResources } from '../security/support/tenant-fixtures';
import { fuzzRuns, fuzzSeed } from './support/fuzz-runs';
import { expectCleanRefusal } from './support/problem-assertions';
import { changedTables, rowCounts } from './support/row-counts';

const doc = loadOpenApi();
// Ending the caller's own session or suspending its tenant would turn every later case into a 401 or 403.
const LEFT_OUT = new Set(['post /v1/auth/sign-out', 'post /v1/auth/password', 'post /v1/admin/tenants/{id}/suspend']);
const ops = apiOperations(doc).filter((o) => o.requestContentTypes.includes('application/json') && !LEFT_OUT.has(`${o.method} ${o.path}`));

// Written besides what a request itself writes: rate-limit counters, the audit of refused sign-ins,
// and mail and reset links that arrive after an earlier accepted request's answer.
const BOOKKEEPING = ['public.rate_limits', 'public.audit_events', 'public.outbox_messages', 'public.password_resets', 'public.sessions'];
const PLANTED = ['id', 'tenantId', 'tenant_id', 'role', 'scopes', 'planId', 'limitOverrides', 'createdBy', 'userId', 'passwordHash', '__proto__', 'constructor'];

function bodies(example: Record<string, unknown>): fc.Arbitrary<unknown> {
  const keys = Object.keys(example);
  const value = fc.jsonValue({ maxDepth: 3 });
  return fc.oneof(
    keys.length ? fc.tuple(fc.constantFrom(...keys), value).map(([k, v]) => ({ ...example, [k]: v })) : value,
    fc.tuple(fc.constantFrom(...PLANTED), value).map(([k, v]) => ({ ...example, [k]: v })),
    value,
  );
}

describe('every JSON body under fuzzing', () => {
  let fixture: AppWithResources;

  beforeAll(async () => {
    fixture = await startAppWithResources(doc, 'fuzz-operations');
  });
  afterAll(async () => fixture?.close());

  it('has JSON-body operations to fuzz', () => {
    expect(ops.length).toBeGreaterThan(15);
  });

  for (const [i, op] of ops.entries()) {
    it(`${op.method.toUpperCase()} ${op.path}`, async () => {
      const example = (exampleBody(doc, op)?.body ?? {}) as Record<string, unknown>;
      const { t, tenant, actorFor } = fixture;
      const url = fillPath(op.path, fixtureValues(op, tenant.fixtures) ?? unknownIds(op));
      const spellings = otherSpellings(url);
      await fc.assert(
        fc.asyncProperty(bodies(example), fc.nat({ max: spellings.length * 2 }), async (body, pick) => {
          // Half the cases go to the documented path, the rest to one of its other spellings.
          const target = pick < spellings.length ? spellings[pick]! : url;
          const before = await rowCounts(t.ctx.db);
          const res = await sendTo(t.app, doc, op, actorFor(op), target, body);
          expectCleanRefusal(res, `${op.method.toUpperCase()} ${target} ${JSON.stringify(body).slice(0, 200)}`);
          // Refused before any handler (API9 checks it is a 404, or a 405 or 400 where the spelling fits another path).
          if (target !== url) expect(res.status, `${target} was answered ${res.status}`).toBeGreaterThanOrEqual(400);
          if (res.status >= 400) expect(changedTables(before, await rowCounts(t.ctx.db), BOOKKEEPING), `${target} refused but wrote`).toEqual([]);
        }),
        { numRuns: fuzzRuns(12), seed: fuzzSeed(7400 + i) },
      );
    });
  }
});

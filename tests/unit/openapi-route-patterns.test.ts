// The validator's path patterns compiled once: the same pattern and options give the very object
// compiled first, other options a pattern of their own, so matching is what path-to-regexp gives.
import { createRequire } from 'node:module';
import { describe, expect, it } from 'vitest';
import { compileOpenApiRoutePatternsOnce } from '../../api/src/lib/openapi-route-patterns';

type Compile = (path: unknown, options?: object) => { regexp: RegExp; keys: { name: string }[] };

describe('OpenAPI route patterns compiled once', () => {
  compileOpenApiRoutePatternsOnce();
  const validatorRequire = createRequire(createRequire(import.meta.url).resolve('express-openapi-validator'));
  const { pathToRegexp } = validatorRequire('path-to-regexp') as { pathToRegexp: Compile };

  it('answers the same pattern with the same options from the first compilation', () => {
    const first = pathToRegexp('/v1/runs/:runId', { sensitive: true, strict: false });
    expect(pathToRegexp('/v1/runs/:runId', { sensitive: true, strict: false })).toBe(first);
    expect(first.keys.map((k) => k.name)).toEqual(['runId']);
    expect(first.regexp.exec('/v1/runs/abc')?.[1]).toBe('abc');
    expect(first.regexp.test('/V1/runs/abc')).toBe(false);
  });

  it('compiles other options separately', () => {
    const insensitive = pathToRegexp('/v1/runs/:runId', { sensitive: false, strict: false });
    expect(insensitive).not.toBe(pathToRegexp('/v1/runs/:runId', { sensitive: true, strict: false }));
    expect(insensitive.regexp.test('/V1/runs/abc')).toBe(true);
  });
});

import { readFileSync } from 'node:fs';
import { parse as parseYaml } from 'yaml';
import { describe, expect, it } from 'vitest';
import { runSchema } from '@gridwright/shared/run-result';
import { siteSpecSchema } from '@gridwright/shared/site-spec';
import { openapiPath } from '../../api/src/app';
import { LIMIT_RANGES } from '../../api/src/lib/limit-ranges';
import { GENERATED_SCHEMAS_END, GENERATED_SCHEMAS_START, withGeneratedSchemas } from '../../api/src/lib/openapi-schemas';

const text = readFileSync(openapiPath, 'utf8');
const doc = parseYaml(text);

describe('openapi.yaml and the zod contract', () => {
  it('carries the schemas generated from shared/src (run `npm run gen:openapi` after changing them)', () => {
    expect(text).toContain(GENERATED_SCHEMAS_START);
    expect(text).toContain(GENERATED_SCHEMAS_END);
    expect(withGeneratedSchemas(text)).toBe(text);
  });

  it('has examples the contract accepts', () => {
    const examples = doc.components.examples;
    expect(siteSpecSchema.safeParse(examples.SiteSpecExample.value).error).toBeUndefined();
    for (const name of ['RunQueuedExample', 'RunSucceededExample']) {
      expect(runSchema.safeParse(examples[name].value).error, name).toBeUndefined();
    }
  });
});

describe('openapi.yaml and the limits an operator may set', () => {
  it('states for each limit override the range the service and the database hold it to (api/src/lib/limit-ranges.ts)', () => {
    const documented = doc.paths['/v1/admin/tenants/{id}'].patch.requestBody.content['application/json'].schema.properties.limitOverrides.properties;
    const asDocumented = Object.fromEntries(
      Object.entries(LIMIT_RANGES).map(([name, r]) => [
        name,
        { type: [r.integer ? 'integer' : 'number', 'null'], ...(r.exclusiveMin ? { exclusiveMinimum: r.min } : { minimum: r.min }), maximum: r.max },
      ]),
    );
    const stated = Object.fromEntries(Object.entries<Record<string, unknown>>(documented).map(([name, { description: _description, ...schema }]) => [name, schema]));
    expect(stated).toEqual(asDocumented);
  });
});

import { readFileSync } from 'node:fs';
import { parse as parseYaml } from 'yaml';
import { describe, expect, it } from 'vitest';
import { runSchema } from '@gridwright/shared/run-result';
import { siteSpecSchema } from '@gridwright/shared/site-spec';
import { openapiPath } from '../../api/src/app';
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

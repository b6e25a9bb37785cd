// `npm run gen:openapi`: writes the component schemas the zod contract owns into openapi/openapi.yaml.
import { readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { withGeneratedSchemas } from '../lib/openapi-schemas';

const openapiPath = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../../../openapi/openapi.yaml');
const current = readFileSync(openapiPath, 'utf8');
const next = withGeneratedSchemas(current);
if (next !== current) writeFileSync(openapiPath, next);
process.stdout.write(next !== current ? 'openapi/openapi.yaml: generated schemas updated\n' : 'openapi/openapi.yaml: generated schemas already up to date\n');

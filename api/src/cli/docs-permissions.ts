// `npm run docs:permissions`: writes the permission matrix into README.md between its markers.
import { readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { parse as parseYaml } from 'yaml';
import { permissionTableFromOpenApi } from '../auth/permission-docs';
import { replacePermissionTable } from '../auth/permissions';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../../..');
const readmePath = path.join(root, 'README.md');
const doc = parseYaml(readFileSync(path.join(root, 'openapi/openapi.yaml'), 'utf8'));
const readme = readFileSync(readmePath, 'utf8');
const next = replacePermissionTable(readme, permissionTableFromOpenApi(doc));
if (next !== readme) writeFileSync(readmePath, next);
process.stdout.write(next !== readme ? 'README.md: permission table updated\n' : 'README.md: permission table already up to date\n');

import { readFileSync } from 'node:fs';
import path from 'node:path';
import { parse as parseYaml } from 'yaml';
import { describe, expect, it } from 'vitest';
import { openapiPath } from '../../../api/src/app';
import { permissionTableFromOpenApi } from '../../../api/src/auth/permission-docs';
import { PERMISSIONS_END, PERMISSIONS_START, replacePermissionTable } from '../../../api/src/auth/permissions';

describe('the README permission table', () => {
  it('is the one the matrix renders (run `npm run docs:permissions` after changing it)', () => {
    const readme = readFileSync(path.resolve(openapiPath, '../../README.md'), 'utf8');
    expect(readme).toContain(PERMISSIONS_START);
    expect(readme).toContain(PERMISSIONS_END);
    const table = permissionTableFromOpenApi(parseYaml(readFileSync(openapiPath, 'utf8')));
    expect(replacePermissionTable(readme, table)).toBe(readme);
  });
});

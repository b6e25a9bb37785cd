import { readFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';

const root = path.resolve(import.meta.dirname, '../..');

describe('README configuration table', () => {
  it('lists exactly the environment variables api/src/config.ts reads', () => {
    const config = readFileSync(path.join(root, 'api/src/config.ts'), 'utf8');
    const read = new Set([...config.matchAll(/env\.([A-Z][A-Z0-9_]*)/g)].map((m) => m[1]));
    const readme = readFileSync(path.join(root, 'README.md'), 'utf8');
    const block = readme.split('<!-- config:start -->')[1]?.split('<!-- config:end -->')[0] ?? '';
    const documented = new Set([...block.matchAll(/^\| `([A-Z][A-Z0-9_]*)` \|/gm)].map((m) => m[1]));
    expect([...documented].sort()).toEqual([...read].sort());
  });
});

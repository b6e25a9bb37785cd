import { readdirSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { environmentSchema } from '../../api/src/config';

const root = path.resolve(import.meta.dirname, '../..');

describe('README configuration table', () => {
  const readme = readFileSync(path.join(root, 'README.md'), 'utf8');
  const block = readme.split('<!-- config:start -->')[1]?.split('<!-- config:end -->')[0] ?? '';
  const defaultCells = new Map([...block.matchAll(/^\| `([A-Z][A-Z0-9_]*)` \| ([^|]*) \|/gm)].map((m) => [m[1]!, m[2]!.trim()]));

  it('lists exactly the environment variables the configuration schema reads', () => {
    expect([...defaultCells.keys()].sort()).toEqual(Object.keys(environmentSchema.shape).sort());
  });

  it("states each fixed default as the schema's, in backticks", () => {
    const defaults: Record<string, unknown> = environmentSchema.parse({ DATABASE_URL: 'postgres://not-read' });
    const fixed = Object.entries(defaults).filter(([name]) => name !== 'DATABASE_URL');
    expect(fixed.length).toBeGreaterThan(20);
    for (const [name, value] of fixed) expect(defaultCells.get(name)?.startsWith(`\`${String(value)}\``), `${name}: ${defaultCells.get(name)}`).toBe(true);
  });

  it('is the only way the api reads the environment', () => {
    const sources = readdirSync(path.join(root, 'api/src'), { recursive: true, encoding: 'utf8' }).filter((f) => f.endsWith('.ts') && f !== 'config.ts');
    const readers = sources.filter((f) => /process\.env/.test(readFileSync(path.join(root, 'api/src', f), 'utf8')));
    expect(readers).toEqual([]);
  });
});

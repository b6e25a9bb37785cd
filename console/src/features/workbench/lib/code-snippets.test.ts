import { describe, expect, it } from 'vitest';
import { curlSnippet, fetchSnippet, keyVariableName } from './code-snippets';

describe('code snippets', () => {
  const input = { origin: 'http://127.0.0.1:8080', spec: { name: "Ann's site" }, keyVariable: 'GRIDWRIGHT_KEY_CI' };

  it('quotes single quotes in the curl body the POSIX-shell way', () => {
    expect(curlSnippet(input)).toContain(`--data-binary '{"name":"Ann'\\''s site"}'`);
    expect(curlSnippet(input)).toContain('Authorization: Bearer $GRIDWRIGHT_KEY_CI');
  });

  it('reads the key from the environment in TypeScript', () => {
    expect(fetchSnippet(input)).toContain('process.env.GRIDWRIGHT_KEY_CI');
    expect(fetchSnippet(input)).toContain("fetch('http://127.0.0.1:8080/v1/runs'");
  });

  it('derives a shell-safe variable name from the key name', () => {
    expect(keyVariableName('ci / staging')).toBe('GRIDWRIGHT_KEY_CI_STAGING');
    expect(keyVariableName('')).toBe('GRIDWRIGHT_KEY');
  });
});

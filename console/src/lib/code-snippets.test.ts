import { describe, expect, it } from 'vitest';
import { curlSnippet, fetchSnippet, keyVariableName, pythonSnippet } from './code-snippets';

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

  it('writes the spec as a Python literal, leaving strings that spell true, false or null alone', () => {
    const code = pythonSnippet({ ...input, spec: { name: 'null site', storage: [{ chargeFromSupplyOnly: true, providesReserve: false }], x: null } });
    expect(code).toContain(`"name": "null site"`);
    expect(code).toContain(`"chargeFromSupplyOnly": True`);
    expect(code).toContain(`"providesReserve": False`);
    expect(code).toContain(`"x": None`);
    expect(code).toContain(`os.environ['GRIDWRIGHT_KEY_CI']`);
    expect(code).toContain('requests.post(\n    "http://127.0.0.1:8080/v1/runs"');
  });

  it('derives a shell-safe variable name from the key name', () => {
    expect(keyVariableName('ci / staging')).toBe('GRIDWRIGHT_KEY_CI_STAGING');
    expect(keyVariableName('')).toBe('GRIDWRIGHT_KEY');
  });
});

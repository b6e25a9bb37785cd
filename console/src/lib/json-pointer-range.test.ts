import { describe, expect, it } from 'vitest';
import { pointerToRange } from './json-pointer-range';

// Pointer parsing itself is tested with the shared module (tests/unit/json-pointer.test.ts).

describe('pointerToRange', () => {
  const text = JSON.stringify(
    { horizon: { start: '2027-03-01T00:00:00+01:00', stepMinutes: 60, steps: 3 }, units: [{ id: 'u1', ratingKw: 5 }, { id: 'u2', ratingKw: -1 }] },
    null,
    2,
  );
  const slice = (r: { from: number; to: number } | null) => (r ? text.slice(r.from, r.to) : null);

  it('highlights a property with its key', () => {
    expect(slice(pointerToRange(text, '/horizon/stepMinutes'))).toBe('"stepMinutes": 60');
  });

  it('indexes arrays numerically', () => {
    const r = pointerToRange(text, '/units/1/ratingKw');
    expect(slice(r)).toBe('"ratingKw": -1');
    expect(r?.exact).toBe(true);
  });

  it('falls back to the key of the object that should hold a missing field', () => {
    const r = pointerToRange(text, '/horizon/timezone');
    expect(slice(r)).toBe('"horizon"');
    expect(r?.exact).toBe(false);
  });

  it('falls back to an array element when its field is missing', () => {
    const r = pointerToRange(text, '/units/0/kind');
    expect(slice(r)).toBe(JSON.stringify({ id: 'u1', ratingKw: 5 }, null, 2).replace(/\n/g, '\n    '));
    expect(r?.exact).toBe(false);
  });

  it('maps the root pointer to the first character', () => {
    expect(pointerToRange(text, '')).toEqual({ from: 0, to: text.length, exact: true });
    expect(pointerToRange(text, '/nothing')).toEqual({ from: 0, to: 1, exact: false });
  });

  it('finds an escaped key (RFC 6901 §4: "~1" is "/", "~0" is "~")', () => {
    const escaped = JSON.stringify({ 'a/b': { 'c~d': 1 } }, null, 2);
    const r = pointerToRange(escaped, '/a~1b/c~0d');
    expect(r && escaped.slice(r.from, r.to)).toBe('"c~d": 1');
    expect(r?.exact).toBe(true);
  });

  it('lands text that is not a pointer on the root, as a missing field', () => {
    expect(pointerToRange(text, 'horizon/steps')).toEqual({ from: 0, to: 1, exact: false });
    expect(pointerToRange(text, '/a~2')).toEqual({ from: 0, to: 1, exact: false });
  });

  it('still maps while the text has a syntax error further down', () => {
    const broken = '{\n  "name": "a",\n  "horizon": { "steps": 4,, }\n';
    expect(broken.slice(pointerToRange(broken, '/name')!.from, pointerToRange(broken, '/name')!.to)).toBe('"name": "a"');
  });
});

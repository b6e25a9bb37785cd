import { describe, expect, it } from 'vitest';
import { formatSpec } from './format-spec';

describe('formatSpec', () => {
  it('keeps number arrays on one line and everything else indented', () => {
    const text = formatSpec({ supply: { availableKw: [0, 12.5, -1e-7] }, units: [{ id: 'a' }] });
    expect(text).toBe('{\n  "supply": {\n    "availableKw": [0, 12.5, -1e-7]\n  },\n  "units": [\n    {\n      "id": "a"\n    }\n  ]\n}');
  });

  it('round-trips through JSON.parse', () => {
    const value = { a: [1, 2, 3], b: { c: [4.25] }, d: ['x', 'y'], e: [] };
    expect(JSON.parse(formatSpec(value))).toEqual(value);
  });
});

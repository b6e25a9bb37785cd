import { describe, expect, it } from 'vitest';
import { validatorPathToPointer } from '../../api/src/lib/error-handler';
import { toJsonPointer } from '../../api/src/lib/json-pointer';

describe('JSON Pointers in problem details', () => {
  // RFC 6901 §3: "~" is written "~0" and "/" is written "~1".
  it('escapes ~ and / per RFC 6901', () => {
    expect(toJsonPointer(['units', 0, 'a/b~c'])).toBe('/units/0/a~1b~0c');
    expect(toJsonPointer([])).toBe('');
  });

  it('turns validator paths into pointers into the body', () => {
    expect(validatorPathToPointer('/body/horizon/steps')).toBe('/horizon/steps');
    expect(validatorPathToPointer('.body.units[2].ratingKw')).toBe('/units/2/ratingKw');
    expect(validatorPathToPointer('/body')).toBe('');
    expect(validatorPathToPointer('/query/limit')).toBe('/query/limit');
  });
});

import { describe, expect, it } from 'vitest';
import { validatorPathToPointer } from '../../api/src/lib/error-handler';

// Escaping itself is tested with the shared module (json-pointer.test.ts).
describe('JSON Pointers in problem details', () => {
  it('turns validator paths into pointers into the body', () => {
    expect(validatorPathToPointer('/body/horizon/steps')).toBe('/horizon/steps');
    expect(validatorPathToPointer('.body.units[2].ratingKw')).toBe('/units/2/ratingKw');
    expect(validatorPathToPointer('/body')).toBe('');
    expect(validatorPathToPointer('/query/limit')).toBe('/query/limit');
  });
});

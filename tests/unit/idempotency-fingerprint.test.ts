import { createHash } from 'node:crypto';
import { describe, expect, it } from 'vitest';
import { bodyFingerprint } from '../../api/src/services/idempotency';

const sha256 = (text: string) => createHash('sha256').update(text).digest('hex');

describe('Idempotency-Key body fingerprint', () => {
  // RFC 8785 §3.2.3: properties sorted by their UTF-16 code units, whatever order they came in.
  it('hashes the RFC 8785 canonical form, properties in UTF-16 code unit order', () => {
    const body = JSON.parse('{"\\u20ac":"Euro Sign","\\r":"Carriage Return","\\ufb33":"Hebrew Letter Dalet With Dagesh","1":"One","\\ud83d\\ude00":"Emoji: Grinning Face","\\u0080":"Control","\\u00f6":"Latin Small Letter O With Diaeresis"}');
    const canonical =
      '{"\\r":"Carriage Return","1":"One","\u0080":"Control","\u00f6":"Latin Small Letter O With Diaeresis","\u20ac":"Euro Sign","\ud83d\ude00":"Emoji: Grinning Face","\ufb33":"Hebrew Letter Dalet With Dagesh"}';
    expect(bodyFingerprint(body)).toBe(sha256(canonical));
  });

  // RFC 8785 §3.2.2.3: numbers as ECMAScript writes them, so 1.50 and 1.5 are one value.
  it('gives one fingerprint for one JSON value, however its keys are ordered, spaced or its numbers written', () => {
    const a = JSON.parse('{"name":"yard","units":[{"id":"u1","ratingKw":1.50,"initial":{"on":true}}],"solver":{"timeLimitSeconds":20}}');
    const b = JSON.parse('{ "solver": { "timeLimitSeconds": 2e1 }, "units": [ { "initial": { "on": true }, "ratingKw": 1.5, "id": "u1" } ], "name": "yard" }');
    expect(bodyFingerprint(b)).toBe(bodyFingerprint(a));
    expect(bodyFingerprint(a)).toBe(sha256('{"name":"yard","solver":{"timeLimitSeconds":20},"units":[{"id":"u1","initial":{"on":true},"ratingKw":1.5}]}'));
  });

  it('tells apart bodies that differ in a value or in the order of an array', () => {
    expect(bodyFingerprint({ units: ['u1', 'u2'] })).not.toBe(bodyFingerprint({ units: ['u2', 'u1'] }));
    expect(bodyFingerprint({ name: 'yard' })).not.toBe(bodyFingerprint({ name: 'yard ' }));
  });
});

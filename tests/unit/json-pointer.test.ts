import { describe, expect, it } from 'vitest';
import { buildPointer, escapeToken, isPointer, parsePointer, unescapeToken } from '@gridwright/shared/json-pointer';

// The document and pointers of RFC 6901 §5, with the reference tokens each pointer names.
const RFC_6901_EXAMPLES: [string, string[]][] = [
  ['', []],
  ['/foo', ['foo']],
  ['/foo/0', ['foo', '0']],
  ['/', ['']],
  ['/a~1b', ['a/b']],
  ['/c%d', ['c%d']],
  ['/e^f', ['e^f']],
  ['/g|h', ['g|h']],
  ['/i\\j', ['i\\j']],
  ['/k"l', ['k"l']],
  ['/ ', [' ']],
  ['/m~0n', ['m~n']],
];

describe('JSON Pointer (RFC 6901)', () => {
  it('parses the examples of RFC 6901 §5 and builds them back', () => {
    for (const [pointer, tokens] of RFC_6901_EXAMPLES) {
      expect(parsePointer(pointer), pointer).toEqual(tokens);
      expect(buildPointer(tokens), pointer).toBe(pointer);
    }
  });

  it('unescapes "~1" before "~0", so "~01" is "~1" and not "/" (RFC 6901 §4)', () => {
    expect(unescapeToken('~01')).toBe('~1');
    expect(parsePointer('/a~1b/c~0d/~01')).toEqual(['a/b', 'c~d', '~1']);
    expect(escapeToken('~1')).toBe('~01');
  });

  it('builds pointers from property names and array indices', () => {
    expect(buildPointer(['units', 0, 'a/b~c'])).toBe('/units/0/a~1b~0c');
    expect(buildPointer([])).toBe('');
  });

  it('refuses text that is not a pointer (RFC 6901 §3: "~" only as "~0" or "~1", a leading "/")', () => {
    for (const text of ['units/0', '/a~', '/a~2b', '#/units']) {
      expect(isPointer(text), text).toBe(false);
      expect(() => parsePointer(text), text).toThrow(SyntaxError);
    }
  });
});

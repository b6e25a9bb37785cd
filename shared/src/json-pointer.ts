// RFC 6901 JSON Pointer, the one implementation the api (problem details, validation errors) and
// the console (placing those errors in its editors) share.

/** RFC 6901 §3: the empty string, or "/"-prefixed tokens in which "~" appears only as "~0" or "~1". */
const POINTER = /^(?:\/(?:[^~/]|~[01])*)*$/u;

/** `~` → `~0` first, then `/` → `~1` (RFC 6901 §3). */
export const escapeToken = (token: string): string => token.replace(/~/g, '~0').replace(/\//g, '~1');

/** `~1` → `/` first, then `~0` → `~`, so `~01` reads as `~1` (RFC 6901 §4). */
export const unescapeToken = (token: string): string => token.replace(/~1/g, '/').replace(/~0/g, '~');

export const isPointer = (text: string): boolean => POINTER.test(text);

/** The pointer to a path of property names and array indices; `[]` is the whole document, `''`. */
export function buildPointer(path: ReadonlyArray<PropertyKey>): string {
  return path.map((segment) => `/${escapeToken(String(segment))}`).join('');
}

/** The reference tokens of a pointer, unescaped; throws on text that is not a pointer. */
export function parsePointer(pointer: string): string[] {
  if (!isPointer(pointer)) throw new SyntaxError(`not an RFC 6901 JSON Pointer: ${JSON.stringify(pointer)}`);
  return pointer === '' ? [] : pointer.slice(1).split('/').map(unescapeToken);
}

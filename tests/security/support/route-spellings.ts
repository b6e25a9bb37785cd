/**
 * Other spellings of a filled-in path that a lenient router would still match: the prefix or a
 * segment in another case, every letter upper-case, a trailing slash, a doubled trailing slash.
 * Only the path as documented may reach a handler; each of these must be a 404.
 */
export function otherSpellings(url: string): string[] {
  const segments = url.split('/');
  const upperFirst = (s: string) => s.charAt(0).toUpperCase() + s.slice(1);
  // The last segment made only of letters and dashes, so an id or a name taken from the fixtures stays as it is.
  const literal = segments.findLastIndex((s, i) => i > 1 && /^[a-z][a-z-]*$/.test(s));
  const spellings = [
    url.replace(/^\/v1\//, '/V1/'),
    literal > 0 ? segments.map((s, i) => (i === literal ? upperFirst(s) : s)).join('/') : null,
    url.toUpperCase(),
    `${url}/`,
    `${url}//`,
  ];
  return [...new Set(spellings.filter((s): s is string => s !== null && s !== url))];
}

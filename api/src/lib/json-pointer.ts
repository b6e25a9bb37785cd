/** RFC 6901: `~` → `~0`, `/` → `~1`. */
export function toJsonPointer(segments: ReadonlyArray<string | number | symbol>): string {
  if (segments.length === 0) return '';
  return '/' + segments.map((s) => String(s).replace(/~/g, '~0').replace(/\//g, '~1')).join('/');
}

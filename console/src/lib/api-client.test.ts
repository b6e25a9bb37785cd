import { describe, expect, it } from 'vitest';
import { buildUrl, nextCursorFromLink } from './api-client';

// Link header syntax per RFC 8288 §3 (target in angle brackets, then `; rel="next"`).
describe('nextCursorFromLink', () => {
  it('finds the cursor of the next page among several links', () => {
    const link = '</v1/runs?limit=50>; rel="first", </v1/runs?limit=50&cursor=eyJhIjoxfQ>; rel="next"';
    expect(nextCursorFromLink(link)).toBe('eyJhIjoxfQ');
  });

  it('is null without a next link', () => {
    expect(nextCursorFromLink(null)).toBeNull();
    expect(nextCursorFromLink('</v1/runs>; rel="prev"')).toBeNull();
  });
});

describe('buildUrl', () => {
  it('leaves out empty query values', () => {
    expect(buildUrl('/v1/series', { name: 'pv roof', unit: undefined, fill: '' })).toBe('/v1/series?name=pv+roof');
    expect(buildUrl('/v1/runs')).toBe('/v1/runs');
  });
});

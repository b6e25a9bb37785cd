import { expect } from 'vitest';
import { countStatus } from './status-tally';

/** RFC 6901: the empty string, or `/` followed by segments with `~` only as `~0` or `~1`. */
export const isJsonPointer = (p: unknown) => typeof p === 'string' && /^(\/([^~]|~[01])*)*$/u.test(p);

interface ResponseLike {
  status: number;
  headers: Record<string, string>;
  body: any;
  text: string;
}

/** A refusal is never a 5xx, is problem+json (RFC 9457), and a validation refusal names each field by pointer. */
export function expectCleanRefusal(res: ResponseLike, context: string) {
  countStatus(res.status);
  expect(res.status, `${context}: ${res.text.slice(0, 300)}`).toBeLessThan(500);
  if (res.status < 400) return;
  expect(res.headers['content-type'], context).toMatch(/^application\/problem\+json/);
  expect(res.body, context).toMatchObject({ type: expect.any(String), title: expect.any(String), status: res.status, detail: expect.any(String) });
  if (res.status === 400 || res.status === 422) {
    expect(Array.isArray(res.body.errors), `${context}: errors[] on ${res.status}`).toBe(true);
    expect(res.body.errors.length, context).toBeGreaterThan(0);
    for (const e of res.body.errors) {
      expect(isJsonPointer(e.pointer), `${context}: pointer ${JSON.stringify(e.pointer)}`).toBe(true);
      expect(typeof e.message, context).toBe('string');
    }
  }
  expect(res.text, context).not.toMatch(/\bat .+\.(ts|js):\d+/);
}

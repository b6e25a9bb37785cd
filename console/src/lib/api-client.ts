import createClient, { type Middleware } from 'openapi-fetch';
import { ApiProblem, type ProblemBody } from './api-problem';
import type { components, paths } from './api-types';

export type Schemas = components['schemas'];

let sessionCsrf: string | null = null;

/** The session route hands back a CSRF token; the cookie is the fallback after a reload. */
export function rememberCsrfToken(token: string | null | undefined) {
  sessionCsrf = token ?? null;
}

function csrfToken(): string | null {
  const fromCookie = document.cookie
    .split(';')
    .map((c) => c.trim())
    .find((c) => c.startsWith('gw_csrf='));
  return fromCookie ? decodeURIComponent(fromCookie.slice('gw_csrf='.length)) : sessionCsrf;
}

const sendCsrfToken: Middleware = {
  onRequest({ request }) {
    if (request.method !== 'GET' && request.method !== 'HEAD') {
      const token = csrfToken();
      if (token) request.headers.set('X-CSRF-Token', token);
    }
    return request;
  },
};

/**
 * The console's one HTTP client, typed from openapi/openapi.yaml (`npm run gen:api-types`). Uploads and
 * downloads go through it too (`multipartBody`, `saveDownload`), so every request carries the CSRF token.
 */
export const api = createClient<paths>({ baseUrl: window.location.origin, credentials: 'same-origin' });
api.use(sendCsrfToken);

type ClientAnswer<T> = Promise<{ data?: T; error?: unknown; response: Response }>;

/** Returns the body of a 2xx answer; anything else becomes an ApiProblem carrying the problem+json detail. */
export async function unwrap<T>(call: ClientAnswer<T>): Promise<T> {
  const { data, error, response } = await call;
  if (!response.ok) {
    // A proxy or a crashed server may answer with text or nothing instead of problem+json.
    const body: ProblemBody =
      error && typeof error === 'object' ? (error as ProblemBody) : { detail: (typeof error === 'string' ? error.slice(0, 300) : '') || response.statusText };
    throw new ApiProblem(body, response.status);
  }
  return data as T;
}

/**
 * A `bodySerializer` for multipart routes. openapi-typescript types a binary part as a string; the browser
 * sends the File itself, and sets the multipart boundary because the body is FormData.
 */
export function multipartBody(fields: Record<string, string | Blob | undefined>): FormData {
  const form = new FormData();
  for (const [name, value] of Object.entries(fields)) {
    if (value !== undefined) form.set(name, value);
  }
  return form;
}

/** Saves a file answer (`parseAs: 'blob'`) under the server's filename, or `fallbackName` when it sends none. */
export async function saveDownload(call: ClientAnswer<Blob>, fallbackName: string) {
  const blob = await unwrap(call);
  const { response } = await call;
  const disposition = response.headers.get('content-disposition') ?? '';
  const name = /filename="?([^";]+)"?/.exec(disposition)?.[1] ?? fallbackName;
  const url = URL.createObjectURL(blob);
  const a = document.createElement('a');
  a.href = url;
  a.download = name;
  document.body.appendChild(a);
  a.click();
  a.remove();
  setTimeout(() => URL.revokeObjectURL(url), 1000);
}

/** The cursor of the `Link: <…>; rel="next"` header, for cursor-paged lists. */
export function nextCursorFromLink(link: string | null): string | null {
  if (!link) return null;
  for (const part of link.split(',')) {
    const m = /<([^>]+)>\s*;\s*rel="?next"?/.exec(part);
    if (m) return new URL(m[1], 'http://x').searchParams.get('cursor');
  }
  return null;
}

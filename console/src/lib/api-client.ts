import { ApiProblem } from './api-problem';

type QueryValue = string | number | boolean | undefined | null;

export interface RequestOptions {
  method?: 'GET' | 'POST' | 'PATCH' | 'PUT' | 'DELETE';
  query?: Record<string, QueryValue>;
  body?: unknown;
  headers?: Record<string, string>;
  signal?: AbortSignal;
}

const unsafe = new Set(['POST', 'PATCH', 'PUT', 'DELETE']);
let sessionCsrf: string | null = null;

/** The session route hands back a CSRF token; the cookie is the fallback after a reload. */
export function rememberCsrfToken(token: string | null | undefined) {
  sessionCsrf = token ?? null;
}

export function csrfToken(): string | null {
  const fromCookie = document.cookie
    .split(';')
    .map((c) => c.trim())
    .find((c) => c.startsWith('gw_csrf='));
  return fromCookie ? decodeURIComponent(fromCookie.slice('gw_csrf='.length)) : sessionCsrf;
}

export function buildUrl(path: string, query?: Record<string, QueryValue>): string {
  const params = new URLSearchParams();
  for (const [k, v] of Object.entries(query ?? {})) {
    if (v !== undefined && v !== null && v !== '') params.set(k, String(v));
  }
  const qs = params.toString();
  return qs ? `${path}?${qs}` : path;
}

async function send(path: string, opts: RequestOptions): Promise<Response> {
  const method = opts.method ?? 'GET';
  const headers: Record<string, string> = { Accept: 'application/json, application/problem+json', ...opts.headers };
  let body: BodyInit | undefined;
  if (opts.body instanceof FormData) body = opts.body;
  else if (opts.body !== undefined) {
    headers['Content-Type'] = 'application/json';
    body = JSON.stringify(opts.body);
  }
  if (unsafe.has(method)) {
    const token = csrfToken();
    if (token) headers['X-CSRF-Token'] = token;
  }
  const res = await fetch(buildUrl(path, opts.query), { method, headers, body, credentials: 'same-origin', signal: opts.signal });
  if (!res.ok) {
    const text = await res.text();
    let parsed: Record<string, unknown>;
    try {
      parsed = JSON.parse(text);
    } catch {
      parsed = { detail: text.slice(0, 300) || res.statusText };
    }
    throw new ApiProblem(parsed, res.status);
  }
  return res;
}

/** One call outside the typed client (multipart uploads, file downloads); any non-2xx becomes an ApiProblem. */
export async function apiRequest<T>(path: string, opts: RequestOptions = {}): Promise<T> {
  const res = await send(path, opts);
  if (res.status === 204) return undefined as T;
  const type = res.headers.get('content-type') ?? '';
  if (!type.includes('json')) return (await res.text()) as T;
  return (await res.json()) as T;
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

/** Downloads a response body as a file, keeping the server's filename when it sends one. */
export async function apiDownload(path: string, query: Record<string, QueryValue>, fallbackName: string, accept: string) {
  const res = await send(path, { query, headers: { Accept: accept } });
  const blob = await res.blob();
  const disposition = res.headers.get('content-disposition') ?? '';
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

import createClient, { type Middleware } from 'openapi-fetch';
import { csrfToken } from './api-client';
import { ApiProblem } from './api-problem';
import type { components, paths } from './api-types';

export type Schemas = components['schemas'];

const csrf: Middleware = {
  onRequest({ request }) {
    if (request.method !== 'GET' && request.method !== 'HEAD') {
      const token = csrfToken();
      if (token) request.headers.set('X-CSRF-Token', token);
    }
    return request;
  },
};

/** The API client, typed from openapi/openapi.yaml (`npm run gen:api-types`). */
export const api = createClient<paths>({ baseUrl: window.location.origin, credentials: 'same-origin' });
api.use(csrf);

/** Returns the body of a 2xx answer; anything else becomes an ApiProblem carrying the problem+json detail. */
export async function unwrap<T>(call: Promise<{ data?: T; error?: unknown; response: Response }>): Promise<T> {
  const { data, error, response } = await call;
  if (!response.ok) {
    const body = error && typeof error === 'object' ? (error as Record<string, unknown>) : { detail: response.statusText };
    throw new ApiProblem(body, response.status);
  }
  return data as T;
}

import { queryOptions, useQuery } from '@tanstack/react-query';
import { api, rememberCsrfToken, unwrap, type Schemas } from './api-client';
import { isProblem } from './api-problem';

export type Session = Schemas['SessionInfo'];

/** The signed-in session, or null when nobody is signed in (a 401 is an answer here, not an error). */
export async function getSession(): Promise<Session | null> {
  try {
    const session = await unwrap(api.GET('/v1/auth/session'));
    rememberCsrfToken(session.csrfToken);
    return session;
  } catch (err) {
    if (isProblem(err) && err.status === 401) return null;
    throw err;
  }
}

export const sessionQueryKey = ['session'] as const;

export function getSessionQueryOptions() {
  return queryOptions({ queryKey: sessionQueryKey, queryFn: getSession, staleTime: 60_000, retry: false });
}

export function useSession() {
  return useQuery(getSessionQueryOptions());
}

export function hasPermission(session: Session | null | undefined, permission: string): boolean {
  return !!session?.permissions.includes(permission);
}

/** True when the signed-in user holds the permission; false while loading or signed out. */
export function usePermission(permission: string): boolean {
  const { data } = useSession();
  return hasPermission(data, permission);
}

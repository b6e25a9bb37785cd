import type { Session } from './session';

/**
 * The page a person is sent back to after signing in, and who was on it. A page one person or role
 * had open means nothing to another (an operator has no tenant to show it in, an owner's page may be
 * closed to a viewer), so it is only returned to by the same person in the same role.
 */
export interface ReturnTo {
  path: string;
  /** null: nobody was signed in (a link opened cold), so whoever signs in may follow it. */
  userId: string | null;
  role: string | null;
}

export interface SignedIn {
  userId: string;
  role: string;
}

// Kept for the tab, so a session that ends under a reload still knows whose page it was.
const SIGNED_IN_KEY = 'gridwright.signed-in';

export function rememberSignedIn(session: Session) {
  const who: SignedIn = { userId: session.user.id, role: session.role };
  sessionStorage.setItem(SIGNED_IN_KEY, JSON.stringify(who));
}

/** Signing out leaves nobody whose page could be returned to. */
export function forgetSignedIn() {
  sessionStorage.removeItem(SIGNED_IN_KEY);
}

export function lastSignedIn(): SignedIn | null {
  try {
    const who = JSON.parse(sessionStorage.getItem(SIGNED_IN_KEY) ?? 'null') as SignedIn | null;
    return who && typeof who.userId === 'string' && typeof who.role === 'string' ? who : null;
  } catch {
    return null;
  }
}

/** The sign-in page's location state when a session ends under a page (it expired, or a link was opened signed out). */
export function returnToState(path: string, who: SignedIn | null): { returnTo: ReturnTo } {
  return { returnTo: { path, userId: who?.userId ?? null, role: who?.role ?? null } };
}

/** Where to go once `session` has signed in: the page to return to when it was theirs, else the start. */
export function pathAfterSignIn(state: unknown, session: Session): string {
  const returnTo = (state as { returnTo?: ReturnTo } | null)?.returnTo;
  if (!returnTo || typeof returnTo.path !== 'string' || !returnTo.path.startsWith('/') || returnTo.path.startsWith('//')) return '/';
  const samePerson = returnTo.userId === null || (returnTo.userId === session.user.id && returnTo.role === session.role);
  return samePerson ? returnTo.path : '/';
}

import { useMutation, useQueryClient } from '@tanstack/react-query';
import { useEffect } from 'react';
import { NavLink, Navigate, Outlet, useLocation, useNavigate } from 'react-router-dom';
import { Button } from '@/components/button';
import { Wordmark } from '@/components/logo-mark';
import { ProblemAlert } from '@/components/problem-alert';
import { Loading } from '@/components/states';
import { api, unwrap } from '@/lib/api-client';
import { forgetSignedIn, lastSignedIn, rememberSignedIn, returnToState } from '@/lib/return-to';
import { hasPermission, sessionQueryKey, useSession, type Session } from '@/lib/session';
import { groupLabels, navItems, type NavItem } from './nav-items';

/** Operators act on the service, not inside one tenant, so they see the operator pages only. */
export function visibleNavItems(session: Session): NavItem[] {
  return navItems.filter(
    (item) => hasPermission(session, item.permission) && (session.role === 'operator') === (item.group === 'operator'),
  );
}

export function homePath(session: Session): string {
  return visibleNavItems(session)[0]?.to ?? '/runs';
}

function SignOutButton() {
  const queryClient = useQueryClient();
  const navigate = useNavigate();
  const signOut = useMutation({
    mutationFn: () => unwrap(api.POST('/v1/auth/sign-out')),
    // Signing out is no lost session: the sign-in page opens with no page to return to, before the
    // shell could see the session gone and remember the page it was on.
    onSettled: () => {
      forgetSignedIn();
      queryClient.setQueryData(sessionQueryKey, null);
      navigate('/sign-in', { replace: true });
      queryClient.removeQueries({ predicate: (q) => q.queryKey[0] !== sessionQueryKey[0] });
    },
  });
  return (
    <Button variant="ghost" size="sm" onClick={() => signOut.mutate()} disabled={signOut.isPending}>
      Sign out
    </Button>
  );
}

export function AppShell() {
  const { data: session, isPending, error } = useSession();
  const location = useLocation();
  // Who holds the session, so that when it ends under this page only they are returned to it.
  useEffect(() => {
    if (session) rememberSignedIn(session);
  }, [session]);
  if (isPending) return <Loading label="Opening the console…" />;
  if (error) return <ProblemAlert error={error} className="m-8" />;
  if (!session) return <Navigate to="/sign-in" replace state={returnToState(location.pathname + location.search, lastSignedIn())} />;

  const items = visibleNavItems(session);
  const groups = (['work', 'tenant', 'operator'] as const).filter((g) => items.some((i) => i.group === g));
  return (
    <div className="flex min-h-screen flex-col lg:flex-row">
      <aside className="border-b border-ash-200 bg-white lg:w-52 lg:shrink-0 lg:border-r lg:border-b-0">
        <div className="lg:sticky lg:top-0">
        <div className="flex items-center justify-between gap-3 px-4 py-3 lg:block">
          <Wordmark />
          <div className="text-right lg:mt-3 lg:text-left">
            <p className="truncate text-xs font-medium text-ash-800" title={session.user.email}>
              {session.user.name || session.user.email}
            </p>
            <p className="truncate text-[11px] text-ash-500">
              {session.tenant?.name ?? 'Gridwright service'} · <span data-testid="role">{session.role}</span>
            </p>
          </div>
        </div>
        <nav aria-label="Main" className="flex gap-4 overflow-x-auto px-2 pb-2 lg:block lg:space-y-4 lg:px-2 lg:pt-2">
          {groups.map((g) => (
            <div key={g} className="flex shrink-0 items-center gap-1 lg:block">
              <p className="hidden px-2 pb-1 text-[10px] font-semibold uppercase tracking-wider text-ash-400 lg:block">{groupLabels[g]}</p>
              {items
                .filter((i) => i.group === g)
                .map((item) => (
                  <NavLink
                    key={item.to}
                    to={item.to}
                    className={({ isActive }) =>
                      `block whitespace-nowrap rounded-md px-2 py-1 text-[13px] ${
                        isActive ? 'bg-ash-900 font-medium text-white' : 'text-ash-700 hover:bg-ash-100'
                      }`
                    }
                  >
                    {item.label}
                  </NavLink>
                ))}
            </div>
          ))}
        </nav>
        <div className="flex flex-wrap items-center gap-1 px-2 pb-2 lg:mt-4 lg:border-t lg:border-ash-100 lg:pt-2">
          <NavLink to="/account" className="whitespace-nowrap rounded-md px-2 py-1 text-xs text-ash-600 hover:bg-ash-100">
            Your account
          </NavLink>
          <SignOutButton />
          <a href="/docs" target="_blank" rel="noreferrer" className="whitespace-nowrap rounded-md px-2 py-1 text-xs text-ash-600 hover:bg-ash-100 lg:basis-full">
            API reference ↗
          </a>
        </div>
        </div>
      </aside>
      <main className="min-w-0 flex-1 px-4 py-4 lg:px-6">
        <Outlet />
      </main>
    </div>
  );
}

export function HomeRedirect() {
  const { data } = useSession();
  return <Navigate to={data ? homePath(data) : '/sign-in'} replace />;
}

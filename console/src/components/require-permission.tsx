import type { ReactNode } from 'react';
import { useSession, hasPermission } from '@/lib/session';
import { Loading } from './states';

/** Every route guards itself: a missing permission gets a refusal, not the screen. */
export function RequirePermission({ permission, children }: { permission: string; children: ReactNode }) {
  const { data, isPending } = useSession();
  if (isPending) return <Loading />;
  if (!hasPermission(data, permission)) {
    return (
      <div role="alert" className="mx-auto mt-16 max-w-md rounded-lg border border-ash-200 bg-white p-6 text-center">
        <p className="text-sm font-semibold text-ash-900">Not available to your role</p>
        <p className="mt-1 text-sm text-ash-500">
          This page needs the <code className="font-mono text-xs">{permission}</code> permission. Ask a tenant admin if you need it.
        </p>
      </div>
    );
  }
  return <>{children}</>;
}

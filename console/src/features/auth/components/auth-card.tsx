import type { ReactNode } from 'react';
import { LogoMark } from '@/components/logo-mark';

export function AuthCard({ title, children, footer }: { title: string; children: ReactNode; footer?: ReactNode }) {
  return (
    <div className="flex min-h-screen items-center justify-center bg-ash-100 px-4">
      <div className="w-full max-w-sm">
        <div className="mb-6 flex items-center gap-2.5">
          <LogoMark className="h-8 w-8" />
          <div>
            <p className="text-base font-semibold tracking-tight">Gridwright</p>
            <p className="text-xs text-ash-500">Schedules for energy sites, from one JSON spec</p>
          </div>
        </div>
        <div className="rounded-lg border border-ash-200 bg-white p-5 shadow-sm">
          <h1 className="mb-4 text-base font-semibold">{title}</h1>
          {children}
        </div>
        {footer && <div className="mt-4 text-center text-xs text-ash-500">{footer}</div>}
      </div>
    </div>
  );
}

import type { ReactNode } from 'react';

export function Loading({ label = 'Loading…' }: { label?: string }) {
  return (
    <div role="status" className="flex items-center gap-2 px-1 py-6 text-sm text-ash-500">
      <span className="h-3 w-3 animate-spin rounded-full border-2 border-ash-300 border-t-kiln-500" aria-hidden="true" />
      {label}
    </div>
  );
}

export function EmptyState({ title, children }: { title: string; children?: ReactNode }) {
  return (
    <div className="rounded-lg border border-dashed border-ash-300 px-6 py-10 text-center">
      <p className="text-sm font-medium text-ash-700">{title}</p>
      {children && <div className="mt-1 text-sm text-ash-500">{children}</div>}
    </div>
  );
}

import type { ReactNode } from 'react';

export function PageHeader({ title, subtitle, actions }: { title: ReactNode; subtitle?: ReactNode; actions?: ReactNode }) {
  return (
    <header className="mb-4 flex flex-wrap items-end justify-between gap-3 border-b border-ash-200 pb-3">
      <div className="min-w-0">
        <h1 className="truncate text-lg font-semibold tracking-tight text-ash-900">{title}</h1>
        {subtitle && <div className="mt-0.5 text-sm text-ash-500">{subtitle}</div>}
      </div>
      {actions && <div className="flex flex-wrap items-center gap-2">{actions}</div>}
    </header>
  );
}

export function Panel({ title, actions, children, className = '' }: { title?: ReactNode; actions?: ReactNode; children: ReactNode; className?: string }) {
  return (
    <section className={`rounded-lg border border-ash-200 bg-white ${className}`}>
      {title && (
        <div className="flex items-center justify-between gap-2 border-b border-ash-100 px-3 py-2">
          <h2 className="text-[13px] font-semibold text-ash-800">{title}</h2>
          {actions}
        </div>
      )}
      <div className="p-3">{children}</div>
    </section>
  );
}

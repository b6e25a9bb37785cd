import type { ReactNode } from 'react';

/** The dense table style used across the console: small type, tabular figures, sticky header. */
export function Table({ children, label }: { children: ReactNode; label: string }) {
  return (
    <div className="overflow-x-auto rounded-lg border border-ash-200 bg-white">
      <table className="w-full border-collapse text-[13px]" aria-label={label}>
        {children}
      </table>
    </div>
  );
}

export function Th({ children, className = '' }: { children?: ReactNode; className?: string }) {
  return (
    <th scope="col" className={`sticky top-0 border-b border-ash-200 bg-ash-50 px-2.5 py-1.5 text-left text-[11px] font-semibold uppercase tracking-wide text-ash-500 ${className}`}>
      {children}
    </th>
  );
}

export function Td({ children, className = '' }: { children?: ReactNode; className?: string }) {
  return <td className={`border-b border-ash-100 px-2.5 py-1.5 align-middle ${className}`}>{children}</td>;
}

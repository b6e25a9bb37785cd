import type { ReactNode } from 'react';

export function ChartFrame({ title, note, height = 200, children }: { title: string; note?: ReactNode; height?: number; children: ReactNode }) {
  return (
    <figure className="min-w-0 rounded-lg border border-ash-200 bg-white p-3" aria-label={title}>
      <figcaption className="mb-2 flex items-baseline justify-between gap-2">
        <span className="text-[13px] font-semibold text-ash-800">{title}</span>
        {note && <span className="text-[11px] text-ash-500">{note}</span>}
      </figcaption>
      <div style={{ height }}>{children}</div>
    </figure>
  );
}

import type { ReactNode } from 'react';

/**
 * A chart with its title and its unit: a figure named by the title, so a person (and a test)
 * finds it by its accessible name. `caption` goes under the plot: what to read from it.
 */
export function ChartFrame({ title, note, caption, height = 200, children }: { title: string; note?: ReactNode; caption?: ReactNode; height?: number; children: ReactNode }) {
  return (
    <figure className="min-w-0 rounded-lg border border-ash-200 bg-white p-3" aria-label={title}>
      <figcaption className="mb-2 flex items-baseline justify-between gap-2">
        <span className="text-[13px] font-semibold text-ash-800">{title}</span>
        {note && <span className="text-[11px] text-ash-500">{note}</span>}
      </figcaption>
      <div style={{ height }}>{children}</div>
      {caption && <div className="mt-2 text-[11px] leading-snug text-ash-600">{caption}</div>}
    </figure>
  );
}

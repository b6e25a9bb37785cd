import { useVirtualizer } from '@tanstack/react-virtual';
import { useMemo, useRef } from 'react';
import type { Schedule } from '@gridwright/shared/run-result';
import type { SiteSpec } from '@gridwright/shared/site-spec';
import { shortTime } from '../lib/chart-data';
import { stepColumns } from '../lib/step-columns';

const ROW = 26;
const fmt = (n: number | null | undefined, digits = 2) => (n === null || n === undefined ? '—' : Number.isInteger(n) ? String(n) : n.toFixed(digits));

/** Every step of the schedule; only the rows in view are rendered, so a year at 15 minutes scrolls smoothly. */
export function ScheduleTable({ schedule, spec }: { schedule: Schedule; spec?: SiteSpec }) {
  const columns = useMemo(() => stepColumns(schedule, spec), [schedule, spec]);
  const parent = useRef<HTMLDivElement>(null);
  const rows = schedule.timestamps.length;
  const virtual = useVirtualizer({ count: rows, getScrollElement: () => parent.current, estimateSize: () => ROW, overscan: 12 });
  const template = `4rem 8rem repeat(${columns.length}, minmax(6.5rem, 1fr))`;
  // The rows are positioned absolutely, so they cannot widen their container: it is given the columns' least width.
  const minWidth = `${12 + columns.length * 6.5}rem`;
  return (
    <div className="rounded-lg border border-ash-200 bg-white" role="table" aria-label="Schedule" aria-rowcount={rows + 1}>
      <div ref={parent} className="max-h-[28rem] overflow-auto">
        <div role="row" className="sticky top-0 z-10 grid items-end border-b border-ash-200 bg-ash-50 text-[11px] font-semibold uppercase tracking-wide text-ash-500" style={{ gridTemplateColumns: template, minWidth }}>
          <span role="columnheader" className="px-2 py-1.5">Step</span>
          <span role="columnheader" className="px-2 py-1.5">Start</span>
          {columns.map((c) => (
            <span role="columnheader" key={c.key} className="px-2 py-1.5 text-right leading-tight normal-case break-words" title={c.label}>
              {c.label}
            </span>
          ))}
        </div>
        <div style={{ height: virtual.getTotalSize(), position: 'relative', minWidth }}>
          {virtual.getVirtualItems().map((item) => (
            <div
              role="row"
              key={item.key}
              className="absolute left-0 grid w-full border-b border-ash-100 font-mono text-xs hover:bg-ash-50"
              style={{ gridTemplateColumns: template, height: ROW, transform: `translateY(${item.start}px)` }}
            >
              <span role="cell" className="px-2 py-1 text-ash-500">{item.index}</span>
              <span role="cell" className="px-2 py-1 whitespace-nowrap">{shortTime(schedule.timestamps[item.index])}</span>
              {columns.map((c) => {
                const v = c.value(item.index);
                return (
                  <span role="cell" key={c.key} className={`px-2 py-1 text-right ${c.onOff && v !== null && v >= 0.5 ? 'font-semibold text-kiln-700' : ''}`}>
                    {c.onOff ? (v !== null && v >= 0.5 ? 'on' : 'off') : fmt(v, c.digits)}
                  </span>
                );
              })}
            </div>
          ))}
        </div>
      </div>
    </div>
  );
}

import { useVirtualizer } from '@tanstack/react-virtual';
import { useMemo, useRef } from 'react';
import type { Schedule } from '@gridwright/shared/run-result';
import type { SiteSpec } from '@gridwright/shared/site-spec';
import { formatNumber } from '@/lib/format';
import { shortTime } from '../lib/chart-data';
import { stepColumns } from '../lib/step-columns';

const ROW = 26;
const fmt = (n: number | null | undefined, digits = 2) => (n === null || n === undefined ? '—' : formatNumber(n, digits));

// Every track has a fixed minimum and the header and the rows are grids of one template in one box of
// one width, so a column's header sits over its values however long the labels (they are cut, with
// the full label in a tooltip) and however wide the screen.
const STEP_TRACK = '4rem';
const START_TRACK = '8.5rem';
const VALUE_TRACK_REM = 8;

/** Every step of the schedule; only the rows in view are rendered, so a year at 15 minutes scrolls smoothly. */
export function ScheduleTable({ schedule, spec }: { schedule: Schedule; spec?: SiteSpec }) {
  const columns = useMemo(() => stepColumns(schedule, spec), [schedule, spec]);
  const parent = useRef<HTMLDivElement>(null);
  const rows = schedule.timestamps.length;
  const virtual = useVirtualizer({ count: rows, getScrollElement: () => parent.current, estimateSize: () => ROW, overscan: 12 });
  const template = `${STEP_TRACK} ${START_TRACK} repeat(${columns.length}, minmax(${VALUE_TRACK_REM}rem, 1fr))`;
  const width = `max(100%, calc(${STEP_TRACK} + ${START_TRACK} + ${columns.length * VALUE_TRACK_REM}rem))`;
  return (
    <div className="rounded-lg border border-ash-200 bg-white" role="table" aria-label="Schedule" aria-rowcount={rows + 1}>
      <div ref={parent} className="max-h-[28rem] overflow-auto">
        <div style={{ width }}>
          <div
            role="row"
            className="sticky top-0 z-10 grid border-b border-ash-200 bg-ash-50 text-[11px] font-semibold uppercase tracking-wide text-ash-500"
            style={{ gridTemplateColumns: template }}
          >
            <span role="columnheader" className="min-w-0 truncate px-2 py-1.5">Step</span>
            <span role="columnheader" className="min-w-0 truncate px-2 py-1.5">Start</span>
            {columns.map((c) => (
              <span role="columnheader" key={c.key} className="min-w-0 truncate px-2 py-1.5 text-right normal-case" title={c.label}>
                {c.label}
              </span>
            ))}
          </div>
          <div style={{ height: virtual.getTotalSize(), position: 'relative' }}>
            {virtual.getVirtualItems().map((item) => (
              <div
                role="row"
                key={item.key}
                className="absolute left-0 grid w-full border-b border-ash-100 font-mono text-xs hover:bg-ash-50"
                style={{ gridTemplateColumns: template, height: ROW, transform: `translateY(${item.start}px)` }}
              >
                <span role="cell" className="min-w-0 truncate px-2 py-1 text-ash-500">{item.index}</span>
                <span role="cell" className="min-w-0 truncate px-2 py-1">{shortTime(schedule.timestamps[item.index])}</span>
                {columns.map((c) => {
                  const v = c.value(item.index);
                  const on = v !== null && v >= 0.5;
                  return (
                    <span role="cell" key={c.key} className={`min-w-0 truncate px-2 py-1 text-right ${c.onOff && on ? 'font-semibold text-kiln-700' : ''}`}>
                      {c.onOff ? (on ? 'on' : 'off') : fmt(v, c.digits)}
                    </span>
                  );
                })}
              </div>
            ))}
          </div>
        </div>
      </div>
    </div>
  );
}

import { useVirtualizer } from '@tanstack/react-virtual';
import { useMemo, useRef } from 'react';
import type { Schedule } from '@gridwright/shared/run-result';
import { formatNumber } from '@/lib/format';
import { shortTime } from '../lib/chart-data';

interface Column {
  key: string;
  label: string;
  value: (step: number) => number;
  onOff?: boolean;
}

function columnsFor(schedule: Schedule): Column[] {
  const cols: Column[] = [
    { key: 'used', label: 'Supply used kW', value: (t) => schedule.supplyUsedKw[t] },
    { key: 'curt', label: 'Curtailed kW', value: (t) => schedule.curtailedKw[t] },
    { key: 'unserved', label: 'Unserved kW', value: (t) => schedule.unservedKw[t] },
    { key: 'imp', label: 'Import kW', value: (t) => schedule.grid.importKw[t] },
    { key: 'exp', label: 'Export kW', value: (t) => schedule.grid.exportKw[t] },
  ];
  for (const [id, u] of Object.entries(schedule.units)) {
    cols.push({ key: `${id}:on`, label: `${id} on`, value: (t) => u.on[t], onOff: true });
    cols.push({ key: `${id}:p`, label: `${id} kW`, value: (t) => u.powerKw[t] });
  }
  for (const [id, s] of Object.entries(schedule.storage)) {
    cols.push({ key: `${id}:c`, label: `${id} charge kW`, value: (t) => s.chargeKw[t] });
    cols.push({ key: `${id}:d`, label: `${id} discharge kW`, value: (t) => s.dischargeKw[t] });
    cols.push({ key: `${id}:soc`, label: `${id} SOC kWh`, value: (t) => s.socKwh[t] });
  }
  return cols;
}

const ROW = 26;
const fmt = (n: number | undefined) => (n === undefined ? '—' : formatNumber(n));

// Every track has a fixed minimum and the header and the rows are grids of one template in one box of
// one width, so a column's header sits over its values however long the labels (they are cut, with
// the full label in a tooltip) and however wide the screen.
const STEP_TRACK = '4rem';
const START_TRACK = '8.5rem';
const VALUE_TRACK_REM = 8;

/** Every step of the schedule; only the rows in view are rendered, so a year at 15 minutes scrolls smoothly. */
export function ScheduleTable({ schedule }: { schedule: Schedule }) {
  const columns = useMemo(() => columnsFor(schedule), [schedule]);
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
                  return (
                    <span role="cell" key={c.key} className={`min-w-0 truncate px-2 py-1 text-right ${c.onOff && v >= 0.5 ? 'font-semibold text-kiln-700' : ''}`}>
                      {c.onOff ? (v >= 0.5 ? 'on' : 'off') : fmt(v)}
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

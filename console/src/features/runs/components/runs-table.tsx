import { useMemo, useState } from 'react';
import { Link } from 'react-router-dom';
import { Table, Td, Th } from '@/components/data-table';
import { StatusPill } from '@/components/status-pill';
import { formatDateTime, formatNumber, formatSeconds } from '@/lib/format';
import type { Run } from '@/lib/queries/runs';
import { objectiveValue } from '../api';

type SortKey = 'status' | 'name' | 'steps' | 'objective' | 'outcome' | 'solverSeconds' | 'createdAt';

export const NET_VALUE_NOTE = "Net value: the run's objective in your tenant's currency, value earned minus costs — positive is a net value, negative a net cost.";

const columns: { key: SortKey; label: string; numeric?: boolean; title?: string }[] = [
  { key: 'status', label: 'Status' },
  { key: 'name', label: 'Name' },
  { key: 'steps', label: 'Steps', numeric: true },
  { key: 'objective', label: 'Net value', numeric: true, title: NET_VALUE_NOTE },
  { key: 'outcome', label: 'Outcome' },
  { key: 'solverSeconds', label: 'Solve time', numeric: true },
  { key: 'createdAt', label: 'Created' },
];

function sortValue(run: Run, key: SortKey): string | number {
  switch (key) {
    case 'objective':
      return objectiveValue(run) ?? -Infinity;
    case 'steps':
      return run.steps ?? -1;
    case 'solverSeconds':
      return run.solverSeconds ?? -1;
    case 'name':
      return (run.name ?? '').toLowerCase();
    default:
      return run[key] ?? '';
  }
}

export function RunsTable({ runs }: { runs: Run[] }) {
  const [sort, setSort] = useState<{ key: SortKey; dir: 1 | -1 }>({ key: 'createdAt', dir: -1 });
  const sorted = useMemo(
    () =>
      [...runs].sort((a, b) => {
        const va = sortValue(a, sort.key);
        const vb = sortValue(b, sort.key);
        return (va < vb ? -1 : va > vb ? 1 : 0) * sort.dir;
      }),
    [runs, sort],
  );
  return (
    <Table label="Runs">
      <thead>
        <tr>
          {columns.map((c) => (
            <Th key={c.key} className={c.numeric ? 'text-right' : ''}>
              <button
                type="button"
                className="inline-flex items-center gap-1 uppercase hover:text-ash-900"
                aria-sort={sort.key === c.key ? (sort.dir === 1 ? 'ascending' : 'descending') : 'none'}
                title={c.title}
                onClick={() => setSort((s) => ({ key: c.key, dir: s.key === c.key ? (s.dir === 1 ? -1 : 1) : 1 }))}
              >
                {c.label}
                <span aria-hidden="true" className={sort.key === c.key ? 'text-kiln-600' : 'text-ash-300'}>
                  {sort.key === c.key && sort.dir === 1 ? '▲' : '▼'}
                </span>
              </button>
            </Th>
          ))}
        </tr>
      </thead>
      <tbody>
        {sorted.map((run) => (
          <tr key={run.id} className="hover:bg-ash-50">
            <Td>
              <StatusPill status={run.status} />
              {run.status === 'running' && (run.progress?.windowsTotal ?? 0) > 1 && (
                <span className="ml-1.5 font-mono text-[11px] text-ash-500">
                  {run.progress?.windowsDone}/{run.progress?.windowsTotal}
                </span>
              )}
            </Td>
            <Td className="max-w-[22rem] truncate">
              <Link to={`/runs/${run.id}`} className="font-medium text-ash-900 hover:text-kiln-700 hover:underline">
                {run.name || <span className="font-mono text-xs text-ash-500">{run.id}</span>}
              </Link>
            </Td>
            <Td className="text-right font-mono text-xs">{run.steps ?? '—'}</Td>
            <Td className="text-right font-mono text-xs">{formatNumber(objectiveValue(run), 2, { signed: true })}</Td>
            <Td className="text-xs">{run.outcome ?? '—'}</Td>
            <Td className="text-right font-mono text-xs">{formatSeconds(run.solverSeconds)}</Td>
            <Td className="whitespace-nowrap text-xs text-ash-600">{formatDateTime(run.createdAt)}</Td>
          </tr>
        ))}
      </tbody>
    </Table>
  );
}

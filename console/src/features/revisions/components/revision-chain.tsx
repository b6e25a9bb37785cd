import { Link } from 'react-router-dom';
import type { RevisionChain } from '@gridwright/shared/revisions';
import { Table, Td, Th } from '@/components/data-table';
import { StatusPill } from '@/components/status-pill';
import { formatDateTime, formatNumber } from '@/lib/format';

/**
 * The chain of revisions a run belongs to, by the step each starts at in the first run's horizon.
 * The radio picks the revision this run is compared with.
 */
export function RevisionChainTable({
  chain,
  currentId,
  baseId,
  onBase,
}: {
  chain: RevisionChain;
  currentId: string;
  baseId: string | null;
  onBase: (id: string) => void;
}) {
  return (
    <Table label="Revisions">
      <thead>
        <tr>
          <Th>Compare</Th>
          <Th>Revision</Th>
          <Th>Plans from</Th>
          <Th className="text-right">Step (first run)</Th>
          <Th className="text-right">Steps</Th>
          <Th>Status</Th>
          <Th className="text-right">Objective (own steps)</Th>
        </tr>
      </thead>
      <tbody>
        {chain.items.map((item) => {
          const current = item.id === currentId;
          return (
            <tr key={item.id} className={current ? 'bg-kiln-50' : 'hover:bg-ash-50'}>
              <Td>
                {current ? (
                  <span className="text-[11px] font-semibold uppercase text-kiln-700">this run</span>
                ) : (
                  <input
                    type="radio"
                    name="revision-base"
                    className="accent-kiln-600"
                    aria-label={`Compare with ${item.name ?? item.id}`}
                    checked={baseId === item.id}
                    onChange={() => onBase(item.id)}
                  />
                )}
              </Td>
              <Td className="max-w-[20rem] truncate">
                {current ? (
                  <span className="font-medium">{item.name ?? item.id}</span>
                ) : (
                  <Link to={`/runs/${item.id}?view=revisions`} className="font-medium text-ash-900 hover:text-kiln-700 hover:underline">
                    {item.name ?? item.id}
                  </Link>
                )}
                {item.parentId === null && <span className="ml-2 text-[11px] text-ash-500">first plan</span>}
              </Td>
              <Td className="whitespace-nowrap text-xs">{formatDateTime(item.startsAt)}</Td>
              <Td className="text-right font-mono text-xs">{item.rootStep}</Td>
              <Td className="text-right font-mono text-xs">{item.steps}</Td>
              <Td>
                <StatusPill status={item.status} />
              </Td>
              <Td className="text-right font-mono text-xs">{formatNumber(item.objective)}</Td>
            </tr>
          );
        })}
      </tbody>
    </Table>
  );
}

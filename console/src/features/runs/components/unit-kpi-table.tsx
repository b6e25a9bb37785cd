import type { Kpis } from '@gridwright/shared/run-result';
import type { SiteSpec } from '@gridwright/shared/site-spec';
import { Table, Td, Th } from '@/components/data-table';
import { formatNumber } from '@/lib/format';

/**
 * Per unit: energy, steps on and starts, split into hot and cold (SPEC §5). A unit with one start
 * cost has no such split — every start costs the same — so its hot and cold cells show a dash.
 */
export function UnitKpiTable({ kpis, units }: { kpis: Pick<Kpis, 'units'>; units: SiteSpec['units'] }) {
  const rows = Object.entries(kpis.units);
  if (rows.length === 0) return null;
  const hasHotCold = (id: string) => typeof units?.find((u) => u.id === id)?.startupCost === 'object';
  const anySingle = rows.some(([id]) => !hasHotCold(id));
  return (
    <div>
    <Table label="Unit KPIs">
      <thead>
        <tr>
          <Th>Unit</Th>
          <Th className="text-right">Energy kWh</Th>
          <Th className="text-right">Steps on</Th>
          <Th className="text-right">Starts</Th>
          <Th className="text-right">Hot</Th>
          <Th className="text-right">Cold</Th>
        </tr>
      </thead>
      <tbody>
        {rows.map(([id, k]) => (
          <tr key={id}>
            <Td className="font-mono text-xs">{id}</Td>
            <Td className="text-right font-mono text-xs">{formatNumber(k.energyKwh, 1)}</Td>
            <Td className="text-right font-mono text-xs">{k.onSteps}</Td>
            <Td className="text-right font-mono text-xs">{k.starts}</Td>
            <Td className="text-right font-mono text-xs">{hasHotCold(id) ? k.starts - k.coldStarts : '—'}</Td>
            <Td className="text-right font-mono text-xs">{hasHotCold(id) ? k.coldStarts : '—'}</Td>
          </tr>
        ))}
      </tbody>
    </Table>
      {anySingle && <p className="mt-1 text-[11px] text-ash-500">— one start cost for the unit: every start costs the same, so there is no hot/cold split.</p>}
    </div>
  );
}

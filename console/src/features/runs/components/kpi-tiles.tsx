import type { ShownResult } from '../lib/stored-result';
import { formatNumber, formatPercent, formatSeconds } from '@/lib/format';

function Tile({ label, value, unit, emphasis }: { label: string; value: string; unit?: string; emphasis?: boolean }) {
  return (
    <div className={`rounded-lg border px-3 py-2 ${emphasis ? 'border-kiln-200 bg-kiln-50' : 'border-ash-200 bg-white'}`}>
      <p className="text-[11px] font-medium uppercase tracking-wide text-ash-500">{label}</p>
      <p className="mt-0.5 font-mono text-lg font-semibold text-ash-900">
        {value}
        {unit && <span className="ml-1 text-xs font-normal text-ash-500">{unit}</span>}
      </p>
    </div>
  );
}

/**
 * `elapsedSeconds`: the run's solve as the worker timed it. The model report's solver seconds are
 * summed over windows and blocks solved side by side, so they can exceed it.
 */
export function KpiTiles({ result, elapsedSeconds }: { result: ShownResult; elapsedSeconds: number | null | undefined }) {
  const k = result.kpis;
  return (
    <div className="grid grid-cols-2 gap-2 md:grid-cols-4 xl:grid-cols-8" data-testid="kpi-tiles">
      <Tile label="Objective" value={formatNumber(result.objective.value)} emphasis />
      <Tile label="MIP gap" value={formatPercent(result.objective.gap, 3)} />
      <Tile label="Supply used" value={formatNumber(k?.suppliedKwh, 0)} unit="kWh" />
      <Tile label="Curtailed" value={formatNumber(k?.curtailedKwh, 0)} unit="kWh" />
      <Tile label="Import" value={formatNumber(k?.importKwh, 0)} unit="kWh" />
      <Tile label="Export" value={formatNumber(k?.exportKwh, 0)} unit="kWh" />
      <Tile label="Unserved" value={formatNumber(k?.unservedKwh, 0)} unit="kWh" />
      <Tile label="Solve" value={formatSeconds(elapsedSeconds ?? result.model.solveSeconds)} />
    </div>
  );
}

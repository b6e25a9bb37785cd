import { useMemo } from 'react';
import type { SiteSpec } from '@gridwright/shared/site-spec';
import { AdvisoryNote } from '@/components/advisory-note';
import { Panel } from '@/components/page-header';
import { EmptyState } from '@/components/states';
import { chargeLines } from '../lib/demand-charge-windows';
import type { ShownResult } from '../lib/stored-result';
import { GridChart } from './grid-chart';
import { KpiTiles } from './kpi-tiles';
import { StorageLevelChart, StoreLevelChart } from './level-chart';
import { MarginalValueCharts } from './marginal-value-charts';
import { ObjectiveTermsChart } from './objective-terms-chart';
import { ReserveChart } from './reserve-chart';
import { SupplyChart } from './supply-chart';
import { UnitKpiTable } from './unit-kpi-table';
import { UnitPowerChart, UnitStrips } from './unit-charts';
import { WarningsList } from './warnings-list';

/**
 * The dispatch view. The charts over the horizon are stacked full width on one time axis — supply,
 * grid, units, then the marginal values under them — so a step reads straight down; the charts of
 * levels, reserve and money follow in two columns.
 */
export function DispatchView({
  result,
  elapsedSeconds,
  spec,
  onPointer,
}: {
  result: ShownResult;
  elapsedSeconds: number | null | undefined;
  spec: SiteSpec | undefined;
  onPointer: (p: string) => void;
}) {
  const { schedule, kpis } = result;
  const charges = useMemo(
    () => (schedule && spec?.grid?.demandCharges?.length ? chargeLines(schedule, spec.grid.demandCharges, kpis?.demandCharges) : []),
    [schedule, spec, kpis],
  );
  const showGrid = schedule && (spec?.grid || schedule.grid.importKw.some((v) => v > 0) || schedule.grid.exportKw.some((v) => v > 0));
  return (
    <div className="space-y-3">
      <KpiTiles result={result} elapsedSeconds={elapsedSeconds} />
      <Panel title={`Warnings and diagnosis (${result.warnings.length})`}>
        <WarningsList warnings={result.warnings} onPointer={onPointer} />
      </Panel>
      {schedule ? (
        <>
          <AdvisoryNote />
          <div className="space-y-3" data-testid="dispatch-charts">
            <section className="grid gap-3" aria-label="Dispatch over the horizon">
              <SupplyChart schedule={schedule} />
              {showGrid && <GridChart schedule={schedule} charges={charges} />}
              <UnitPowerChart schedule={schedule} spec={spec} />
              <MarginalValueCharts schedule={schedule} stores={spec?.stores} />
            </section>
            <div className="grid gap-3 xl:grid-cols-2">
              {kpis?.objectiveTerms && <ObjectiveTermsChart terms={kpis.objectiveTerms} objective={result.objective.value} />}
              {kpis && Object.keys(kpis.units).length > 0 && (
                <Panel title="Units: energy and starts">
                  <UnitKpiTable kpis={kpis} units={spec?.units} />
                </Panel>
              )}
              <UnitStrips schedule={schedule} spec={spec} />
              <ReserveChart schedule={schedule} spec={spec} shortfallKwh={kpis?.reserveShortfallKwh} />
              {(spec?.storage ?? []).map((s) => (
                <StorageLevelChart key={s.id} schedule={schedule} storage={s} />
              ))}
              {(spec?.stores ?? []).map((s) => (
                <StoreLevelChart key={s.id} schedule={schedule} store={s} />
              ))}
            </div>
          </div>
        </>
      ) : (
        <EmptyState title="No schedule">The solver returned {result.outcome}: see the warnings above for what conflicts.</EmptyState>
      )}
    </div>
  );
}

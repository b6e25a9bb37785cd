// The bench's store-valuation section, a design benchmark: how a non-final rolling window should value
// product it leaves in a store (api/src/engine/terminal-values.ts). The value curve of the steps after
// the window's end (what runs use) against one merit-order value for the whole horizon, no value, and
// the median energy value used for batteries, on the pump-station and power-to-X demo sites repeated
// over several days: each rolling objective against the monolithic optimum of the same horizon.
import type { ResolvedSiteSpec } from '@gridwright/shared/site-spec';
import { solveSite } from '../../api/src/engine/solve-site';
import type { StoreValuation } from '../../api/src/engine/terminal-values';
import { verifySchedule } from '../../api/src/engine/verify-schedule';
import { repeatedExample } from '../engine/synthetic-sites';
import { resultRow, timedSolve, type BenchSection, type SectionOptions, type SectionRow } from './rolling-bound';

const VALUATIONS: StoreValuation[] = ['value-curve', 'horizon-value', 'median-energy', 'none'];

export async function storeValuationSection({ solver, quick, log }: SectionOptions): Promise<BenchSection> {
  const rows: SectionRow[] = [];
  const summary: string[] = [];
  const days = quick ? 2 : 4;
  for (const id of ['solar-pump-station', 'grid-electrolyser']) {
    const spec = repeatedExample(id, days, { mipGap: 1e-4, timeLimitSeconds: 900 });
    log(`store valuation: ${id}, ${days} days, monolithic`);
    const whole = await timedSolve({ ...spec, solver: { ...spec.solver, mode: 'monolithic' } }, solver);
    const optimum = whole.r.objective.value!;
    rows.push(resultRow(`${id}, ${days} d: monolithic`, whole.r, whole.seconds, `gap ${whole.r.objective.gap?.toExponential(1) ?? '—'}`));
    const parts: string[] = [];
    for (const valuation of VALUATIONS) {
      log(`store valuation: ${id}, ${days} days, rolling, ${valuation}`);
      const rolling: ResolvedSiteSpec = { ...spec, solver: { ...spec.solver, mode: 'rolling' } };
      const started = performance.now();
      const r = await solveSite(rolling, { solver, storeValuation: valuation });
      const seconds = (performance.now() - started) / 1000;
      if (r.schedule && !verifySchedule(rolling, r.schedule).ok) throw new Error(`store valuation ${valuation}: schedule failed verification`);
      const below = r.objective.value === null ? null : (optimum - r.objective.value) / Math.abs(optimum);
      const shown = below === null ? `${r.outcome}, no schedule` : `${(100 * below).toFixed(2)} % below the optimum`;
      rows.push(resultRow(`${id}, ${days} d: rolling, ${valuation}`, r, seconds, shown));
      parts.push(`${valuation} ${shown}`);
    }
    summary.push(`Store valuation, ${id} over ${days} days, rolling vs monolithic: ${parts.join('; ')}.`);
  }
  return { section: 'Store valuation: product left in a store at a rolling window’s end', rows, summary };
}

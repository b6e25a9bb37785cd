import type { ResolvedSiteSpec } from '@gridwright/shared/site-spec';
import { buildWindowModel, type BuiltModel } from './build-window-model';
import type { Deadline } from './deadline';
import { planWindow, type ForcedBinaries, type WindowPlan } from './plan-window';
import type { ScheduleBuffers } from './schedule-buffers';
import type { SolverPort } from './solver-port';

/**
 * The LP that prices a window's solution: the same window planned with its physical limits instead
 * of the tightened ones (a big-M or bound tightened to what can reach a step would make a free
 * direction look blocked, and the price of energy 0 where a kWh more could still be sold), every
 * unit's on/off and start fixed at the solution's values, and the charge/discharge and
 * import/export choices left continuous, so no direction the site could really take is closed.
 */
function pricingModel(solved: WindowPlan, built: BuiltModel, x: Float64Array): { plan: WindowPlan; model: BuiltModel } {
  const spec: ResolvedSiteSpec = { ...solved.spec, solver: { ...solved.spec.solver, reductions: { ...solved.spec.solver.reductions, tightBigM: false } } };
  const forced: ForcedBinaries = { storage: spec.storage.map(() => new Set<number>()), grid: new Set<number>() };
  const plan = planWindow(spec, solved.facts, solved.window, solved.start, forced);
  const model = buildWindowModel(plan);
  const m = model.model;
  const colLower = m.colLower.slice();
  const colUpper = m.colUpper.slice();
  model.columns.units.forEach((cols, i) => {
    const from = built.columns.units[i];
    for (const kind of ['on', 'start'] as const) {
      cols[kind].forEach((col, k) => {
        if (col < 0) return;
        const at = from[kind][k];
        const v = at < 0 ? 0 : m.integrality[col] ? Math.round(x[at]) : x[at];
        colLower[col] = v;
        colUpper[col] = v;
      });
    }
  });
  return { plan, model: { ...model, model: { ...m, colLower, colUpper, integrality: new Int32Array(m.numCols) } } };
}

/**
 * Marginal values of a window's committed steps, from the duals of its pricing LP: the balance
 * row's dual is what one more kWh of load would change the objective by, so its negative is what a
 * kWh delivered is worth; a store row's dual is what one more unit in the store is worth. Unscaled
 * to money per kWh and per store unit. Left unknown (NaN) when the LP is not solved to optimality
 * in the time left.
 */
export async function priceWindow(
  solver: SolverPort,
  solved: WindowPlan,
  built: BuiltModel,
  x: Float64Array,
  out: ScheduleBuffers,
  opts: { deadline: Deadline; signal?: AbortSignal },
): Promise<{ workerSeconds: number }> {
  if (opts.deadline.remainingSeconds() <= 0) return { workerSeconds: 0 };
  const { plan, model } = pricingModel(solved, built, x);
  const res = await solver.solve(model.model, { deadline: opts.deadline, mipGap: 0, wantDuals: true, signal: opts.signal });
  const duals = res.rowDual;
  if (!duals) return { workerSeconds: res.workerSeconds };
  const { window, scales, dh } = plan;
  for (let k = 0; k < window.commit; k++) {
    const t = window.from + k;
    out.energyValue[t] = (-duals[model.rows.balance[k]] * scales.money) / (scales.powerKw * dh) + 0;
    plan.spec.stores.forEach((_, j) => {
      out.storeValue[j][t] = (duals[model.rows.stores[j][k]] * scales.money) / plan.stores[j].scale + 0;
    });
    plan.spec.storage.forEach((_, i) => {
      out.socValue[i][t] = (duals[model.rows.storage[i][k]] * scales.money) / scales.powerKw + 0;
    });
  }
  return { workerSeconds: res.workerSeconds };
}

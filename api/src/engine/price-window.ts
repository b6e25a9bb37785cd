import type { BuiltModel } from './build-window-model';
import type { ModelArrays } from './model-arrays';
import type { WindowPlan } from './plan-window';
import type { Deadline } from './deadline';
import type { ScheduleBuffers } from './schedule-buffers';
import type { SolverPort } from './solver-port';

/** The LP of a window with every integer column fixed at its value in the solution. */
function withIntegersFixed(model: ModelArrays, x: Float64Array): ModelArrays {
  const colLower = model.colLower.slice();
  const colUpper = model.colUpper.slice();
  for (let j = 0; j < model.numCols; j++) {
    if (!model.integrality[j]) continue;
    const v = Math.round(x[j]);
    colLower[j] = v;
    colUpper[j] = v;
  }
  return { ...model, colLower, colUpper, integrality: new Int32Array(model.numCols) };
}

/**
 * Marginal values of a window's committed steps: the LP with the on/off and exclusivity decisions
 * fixed at the solution is solved again for its duals. The balance row's dual is what one more kWh
 * of load would change the objective by, so its negative is what a kWh delivered is worth; a store
 * row's dual is what one more unit in the store is worth. Unscaled to money per kWh and per store
 * unit. Left unknown (NaN) when the LP is not solved to optimality in the time left.
 */
export async function priceWindow(
  solver: SolverPort,
  plan: WindowPlan,
  built: BuiltModel,
  x: Float64Array,
  out: ScheduleBuffers,
  opts: { deadline: Deadline; signal?: AbortSignal },
): Promise<{ workerSeconds: number }> {
  const { window, scales, dh } = plan;
  if (opts.deadline.remainingSeconds() <= 0) return { workerSeconds: 0 };
  const lp = withIntegersFixed(built.model, x);
  const res = await solver.solve(lp, { deadline: opts.deadline, mipGap: 0, wantDuals: true, signal: opts.signal });
  const duals = res.rowDual;
  if (!duals) return { workerSeconds: res.workerSeconds };
  for (let k = 0; k < window.commit; k++) {
    const t = window.from + k;
    out.energyValue[t] = (-duals[built.rows.balance[k]] * scales.money) / (scales.powerKw * dh) + 0;
    plan.spec.stores.forEach((_, j) => {
      out.storeValue[j][t] = (duals[built.rows.stores[j][k]] * scales.money) / plan.stores[j].scale + 0;
    });
  }
  return { workerSeconds: res.workerSeconds };
}

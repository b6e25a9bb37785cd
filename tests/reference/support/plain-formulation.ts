/**
 * A plain, deliberately unclever MILP of SPEC.md §2 and §5, written from SPEC.md alone for checks
 * from outside the engine (it imports nothing from api/).
 *
 * Nothing is pruned, tightened or scaled: every unit has on, start, stop, hot-start and cold-start
 * binaries at every step, every battery and the grid an exclusivity binary at every step; powers
 * are kW and money as given. The forms are the textbook ones, each next to the sentence of SPEC
 * it writes down:
 * - minimum up/down: start_t − stop_t = on_t − on_{t−1}, start_t + stop_t ≤ 1,
 *   Σ_{τ=t−U+1..t} start_τ ≤ on_t, Σ_{τ=t−D+1..t} stop_τ ≤ 1 − on_t, steps before 0 from the
 *   initial state (a unit on for k < U steps is fixed on for the first U − k steps; likewise off);
 *   rows reach back only into the horizon, so blocks at its end are cut short as §2 allows;
 * - curves: p = Σ_k slice_k, 0 ≤ slice_k ≤ width_k, each slice priced on its own (convex, so the
 *   cheap slices fill first without binaries); no-load: −Δh·noLoadCostPerHour·on;
 * - hot and cold starts: start = hot + cold (both binary) and a hot start at t needs a stop in the
 *   look-back window, hot_t ≤ Σ_{s=t−C..t−1} stop_s (+1 when the initial off spell, stopped at
 *   step −stepsInState, lies in it): a start after at most C = coldAfterSteps steps off;
 * - ramps, with M = the rating: p_t − p_{t−1} ≤ R_up + M·(1 − on_{t−1}) (on in both steps),
 *   p_t ≤ max(minStable, R_up) + M·(1 − start_t) (a start), and symmetrically down with the stop
 *   indicator; p_{−1} = initial.powerKw (none ⇒ no row at step 0), 0 for a unit off at step −1;
 * - spinning reserve: r ≤ rating·on − p (generators), r ≤ p − minStable·on (flexible loads),
 *   r ≤ maxDischarge − d + c and Δh·r ≤ ηd·(soc_t − minSoc) (batteries, soc at the END of step t),
 *   Σ r + shortfall ≥ upKw;
 * - demand charges: excess ≥ imp_t − existingPeakKw on the window's steps (plain-local-time.ts),
 *   excess ≥ 0, −pricePerKw·excess;
 * - charging from supply only: imp ≤ (L − u) + Σ_flex p + Σ_{unflagged} c;
 * - stores: level_t = (1 − loss·Δh)·level_{t−1} + Δh·(made − used − demand + short − spill).
 *
 * The model is a glpk.js LP object; GLPK solves it in-process, and plain-lp-text.ts writes the
 * same model as CPLEX-LP text for Debian's glpsol and cbc. `misreadings` write one rule
 * differently on purpose, to show that a reference case tells the right reading from a wrong one.
 */
import GLPK from 'glpk.js/node';
import type { LP, Result } from 'glpk.js/node';
import type { ResolvedSiteSpec } from '@gridwright/shared/site-spec';
import type { Schedule } from '@gridwright/shared/run-result';
import { windowSteps, type WindowReading } from './plain-local-time';

type Glpk = Awaited<ReturnType<typeof GLPK>>;
type Term = { name: string; coef: number };

/** Wrong readings of SPEC §5, each the way a careless implementation might write one rule. */
export type Misreading =
  | 'no-load-omitted'
  | 'no-load-paid-when-off'
  | 'hot-only-below-cold-after-steps'
  | 'hot-up-to-one-step-past-cold-after-steps'
  | 'start-allowance-is-min-stable'
  | 'start-allowance-is-ramp'
  | 'start-unlimited'
  | 'off-unit-unlimited-at-step-0'
  | 'reserve-energy-at-step-start'
  | 'reserve-energy-unlimited'
  | 'reserve-energy-divided-by-efficiency'
  | 'reserve-energy-ignores-min-soc'
  | 'demand-window-in-utc'
  | 'demand-window-to-inclusive'
  | 'demand-window-from-exclusive'
  | 'demand-existing-peak-ignored'
  | 'demand-existing-peak-not-subtracted'
  | 'store-loss-omitted'
  | 'store-loss-not-on-initial-level'
  | 'store-final-omitted'
  | 'supply-only-omitted'
  | 'supply-only-no-charging-while-importing';

export interface PlainOptions {
  /**
   * The M in `p ≤ M·on` (the unit capacity link). Absent: each unit's rating, the natural
   * choice. The big-M check sets it to 1e10 to show what an arbitrary large constant does.
   */
  capacityBigM?: number;
  misreadings?: readonly Misreading[];
}

export interface PlainModel {
  lp: LP;
  /** Added to the LP's objective: the money that does not depend on any decision (only some misreadings have any). */
  objectiveOffset: number;
  /** Coefficient magnitudes of the constraint matrix: [smallest, largest] non-zero |a_ij|. */
  matrixRange: [number, number];
}

let glpkInstance: Promise<Glpk> | null = null;
/** One GLPK instance per process; loading the WebAssembly once is enough. */
export function glpk(): Promise<Glpk> {
  glpkInstance ??= GLPK();
  return glpkInstance;
}

/** Variable names; short so the CPLEX-LP text of a week-long model stays small. */
export const v = {
  g: (t: number) => `g_${t}`,
  imp: (t: number) => `imp_${t}`,
  exp: (t: number) => `exp_${t}`,
  grid: (t: number) => `gi_${t}`,
  u: (t: number) => `u_${t}`,
  on: (i: number, t: number) => `y_${i}_${t}`,
  start: (i: number, t: number) => `z_${i}_${t}`,
  hot: (i: number, t: number) => `zh_${i}_${t}`,
  cold: (i: number, t: number) => `zc_${i}_${t}`,
  stop: (i: number, t: number) => `w_${i}_${t}`,
  p: (i: number, t: number) => `p_${i}_${t}`,
  slice: (i: number, k: number, t: number) => `q_${i}_${k}_${t}`,
  unitReserve: (i: number, t: number) => `r_${i}_${t}`,
  c: (j: number, t: number) => `c_${j}_${t}`,
  d: (j: number, t: number) => `d_${j}_${t}`,
  soc: (j: number, t: number) => `s_${j}_${t}`,
  ch: (j: number, t: number) => `x_${j}_${t}`,
  batteryReserve: (j: number, t: number) => `rb_${j}_${t}`,
  reserveShort: (t: number) => `rs_${t}`,
  peakExcess: (c: number) => `pk_${c}`,
  level: (m: number, t: number) => `l_${m}_${t}`,
  storeShort: (m: number, t: number) => `sh_${m}_${t}`,
  spill: (m: number, t: number) => `sp_${m}_${t}`,
  importing: (t: number) => `ii_${t}`,
};

export async function buildPlainModel(spec: ResolvedSiteSpec, options: PlainOptions = {}): Promise<PlainModel> {
  const G = await glpk();
  const wrong = new Set(options.misreadings ?? []);
  const T = spec.horizon.steps;
  const dh = spec.horizon.stepMinutes / 60;
  const objective: Term[] = [];
  let objectiveOffset = 0;
  const rows: LP['subjectTo'] = [];
  const bounds: NonNullable<LP['bounds']> = [];
  const binaries: string[] = [];
  let minCoef = Number.POSITIVE_INFINITY;
  let maxCoef = 0;

  const bound = (name: string, lb: number, ub: number) => {
    bounds.push({ name, type: lb === ub ? G.GLP_FX : G.GLP_DB, lb, ub });
  };
  const atLeast = (name: string, lb: number) => {
    bounds.push({ name, type: G.GLP_LO, lb, ub: 0 });
  };
  const row = (name: string, vars: Term[], type: 'le' | 'ge' | 'eq', rhs: number) => {
    for (const term of vars) {
      const a = Math.abs(term.coef);
      if (a > 0) {
        minCoef = Math.min(minCoef, a);
        maxCoef = Math.max(maxCoef, a);
      }
    }
    const kind = type === 'le' ? G.GLP_UP : type === 'ge' ? G.GLP_LO : G.GLP_FX;
    rows.push({ name, vars, bnds: { type: kind, lb: rhs, ub: rhs } });
  };
  const binary = (name: string) => {
    binaries.push(name);
    bound(name, 0, 1);
  };
  const gain = (name: string, coef: number) => objective.push({ name, coef });

  // Supply, unserved load and the grid (SPEC §2).
  const hard = spec.siteLoad.unservedPenaltyPerKwh === null;
  for (let t = 0; t < T; t++) {
    bound(v.g(t), 0, spec.supply.availableKw[t]);
    bound(v.u(t), 0, hard ? 0 : spec.siteLoad.kw[t]);
    bound(v.imp(t), 0, spec.grid.importLimitKw);
    bound(v.exp(t), 0, spec.grid.exportLimitKw);
    gain(v.exp(t), dh * spec.grid.exportPrice[t]);
    gain(v.imp(t), -dh * spec.grid.importPrice[t]);
    if (!hard) gain(v.u(t), -dh * (spec.siteLoad.unservedPenaltyPerKwh ?? 0));
    // Grid exclusivity, always: gi = 1 allows import only, gi = 0 export only.
    binary(v.grid(t));
    row(`gimp_${t}`, [{ name: v.imp(t), coef: 1 }, { name: v.grid(t), coef: -spec.grid.importLimitKw }], 'le', 0);
    row(`gexp_${t}`, [{ name: v.exp(t), coef: 1 }, { name: v.grid(t), coef: spec.grid.exportLimitKw }], 'le', spec.grid.exportLimitKw);
  }

  spec.units.forEach((unit, i) => {
    const M = options.capacityBigM ?? unit.ratingKw;
    const sign = unit.kind === 'generator' ? -1 : 1;
    const init = unit.initial.on ? 1 : 0;
    const k0 = unit.initial.stepsInState;
    // Steps fixed by the initial state: still owed on-time or off-time.
    const owedOn = unit.initial.on ? Math.max(0, unit.minUpSteps - k0) : 0;
    const owedOff = unit.initial.on ? 0 : Math.max(0, unit.minDownSteps - k0);
    const { hot, cold, coldAfterSteps } = unit.startupCost;
    const hotWindow = coldAfterSteps === null
      ? null
      : coldAfterSteps + (wrong.has('hot-only-below-cold-after-steps') ? -1 : wrong.has('hot-up-to-one-step-past-cold-after-steps') ? 1 : 0);
    const minutes = spec.horizon.stepMinutes;
    const rampUp = unit.rampUpKwPerMin === null ? null : unit.rampUpKwPerMin * minutes;
    const rampDown = unit.rampDownKwPerMin === null ? null : unit.rampDownKwPerMin * minutes;
    const startAllowance = rampUp === null ? null
      : wrong.has('start-allowance-is-min-stable') ? unit.minStableKw
        : wrong.has('start-allowance-is-ramp') ? rampUp
          : Math.max(unit.minStableKw, rampUp);
    const stopAllowance = rampDown === null ? null : Math.max(unit.minStableKw, rampDown);
    // p_{−1}: null where SPEC sets no ramp limit at step 0.
    const pBefore = unit.initial.on ? unit.initial.powerKw : 0;

    for (let t = 0; t < T; t++) {
      binary(v.on(i, t));
      binary(v.start(i, t));
      binary(v.stop(i, t));
      binary(v.hot(i, t));
      binary(v.cold(i, t));
      bound(v.p(i, t), 0, unit.ratingKw);

      // Curve slices from 0 kW, each priced on its own.
      const slices: Term[] = [{ name: v.p(i, t), coef: 1 }];
      let lower = 0;
      unit.curve.forEach((slice, k) => {
        bound(v.slice(i, k, t), 0, slice.upToKw - lower);
        gain(v.slice(i, k, t), sign * dh * slice.perKwh);
        slices.push({ name: v.slice(i, k, t), coef: -1 });
        lower = slice.upToKw;
      });
      row(`crv_${i}_${t}`, slices, 'eq', 0);

      if (wrong.has('no-load-paid-when-off')) objectiveOffset -= dh * unit.noLoadCostPerHour;
      else if (!wrong.has('no-load-omitted')) gain(v.on(i, t), -dh * unit.noLoadCostPerHour);
      gain(v.hot(i, t), -hot);
      gain(v.cold(i, t), -cold);

      row(`cap_${i}_${t}`, [{ name: v.p(i, t), coef: 1 }, { name: v.on(i, t), coef: -M }], 'le', 0);
      row(`stab_${i}_${t}`, [{ name: v.p(i, t), coef: 1 }, { name: v.on(i, t), coef: -unit.minStableKw }], 'ge', 0);
      // start − stop − on_t + on_{t−1} = 0, with on_{−1} the initial state on the right.
      const trans: Term[] = [
        { name: v.start(i, t), coef: 1 },
        { name: v.stop(i, t), coef: -1 },
        { name: v.on(i, t), coef: -1 },
      ];
      if (t > 0) trans.push({ name: v.on(i, t - 1), coef: 1 });
      row(`tr_${i}_${t}`, trans, 'eq', t === 0 ? -init : 0);
      row(`one_${i}_${t}`, [{ name: v.start(i, t), coef: 1 }, { name: v.stop(i, t), coef: 1 }], 'le', 1);
      const up: Term[] = [{ name: v.on(i, t), coef: -1 }];
      for (let k = Math.max(0, t - unit.minUpSteps + 1); k <= t; k++) up.push({ name: v.start(i, k), coef: 1 });
      row(`up_${i}_${t}`, up, 'le', 0);
      const down: Term[] = [{ name: v.on(i, t), coef: 1 }];
      for (let k = Math.max(0, t - unit.minDownSteps + 1); k <= t; k++) down.push({ name: v.stop(i, k), coef: 1 });
      row(`dn_${i}_${t}`, down, 'le', 1);
      if (t < owedOn) row(`ion_${i}_${t}`, [{ name: v.on(i, t), coef: 1 }], 'eq', 1);
      if (t < owedOff) row(`ioff_${i}_${t}`, [{ name: v.on(i, t), coef: 1 }], 'eq', 0);

      // Every start is hot or cold; hot only after at most `hotWindow` steps off, i.e. after a
      // stop at some s in [t − hotWindow, t − 1]. The initial off spell began with a stop at
      // step −k0 (a unit on at step −1 stopped, if at all, inside the horizon).
      row(`hc_${i}_${t}`, [{ name: v.start(i, t), coef: 1 }, { name: v.hot(i, t), coef: -1 }, { name: v.cold(i, t), coef: -1 }], 'eq', 0);
      if (hotWindow !== null) {
        const lookBack: Term[] = [{ name: v.hot(i, t), coef: 1 }];
        for (let s = Math.max(0, t - hotWindow); s < t; s++) lookBack.push({ name: v.stop(i, s), coef: -1 });
        const initialStopInWindow = !unit.initial.on && -k0 >= t - hotWindow;
        row(`hw_${i}_${t}`, lookBack, 'le', initialStopInWindow ? 1 : 0);
      }

      // Ramps. At step 0 the previous output is a constant (or unknown: no row).
      const prevKnown = t > 0 || pBefore !== null;
      const fromOff = t === 0 && !unit.initial.on;
      if (rampUp !== null && prevKnown) {
        if (t > 0) {
          row(`ru_${i}_${t}`, [{ name: v.p(i, t), coef: 1 }, { name: v.p(i, t - 1), coef: -1 }, { name: v.on(i, t - 1), coef: M }], 'le', rampUp + M);
        } else if (unit.initial.on) {
          row(`ru_${i}_${t}`, [{ name: v.p(i, t), coef: 1 }], 'le', rampUp + pBefore!);
        }
        const skipStart = wrong.has('start-unlimited') || (fromOff && wrong.has('off-unit-unlimited-at-step-0'));
        if (!skipStart) row(`su_${i}_${t}`, [{ name: v.p(i, t), coef: 1 }, { name: v.start(i, t), coef: M }], 'le', startAllowance! + M);
      }
      if (rampDown !== null && prevKnown) {
        if (t > 0) {
          row(`rd_${i}_${t}`, [{ name: v.p(i, t - 1), coef: 1 }, { name: v.p(i, t), coef: -1 }, { name: v.on(i, t), coef: M }], 'le', rampDown + M);
          row(`sd_${i}_${t}`, [{ name: v.p(i, t - 1), coef: 1 }, { name: v.stop(i, t), coef: M }], 'le', stopAllowance! + M);
        } else if (unit.initial.on) {
          row(`rd_${i}_${t}`, [{ name: v.p(i, t), coef: -1 }, { name: v.on(i, t), coef: M }], 'le', rampDown + M - pBefore!);
          row(`sd_${i}_${t}`, [{ name: v.stop(i, t), coef: M }], 'le', stopAllowance! + M - pBefore!);
        }
      }
    }
  });

  spec.storage.forEach((st, j) => {
    for (let t = 0; t < T; t++) {
      bound(v.c(j, t), 0, st.maxChargeKw);
      bound(v.d(j, t), 0, st.maxDischargeKw);
      const floor = t === T - 1 && st.finalSocKwh !== null ? Math.max(st.minSocKwh, st.finalSocKwh) : st.minSocKwh;
      bound(v.soc(j, t), floor, st.capacityKwh);
      binary(v.ch(j, t));
      gain(v.d(j, t), -dh * st.cycleCostPerKwh);
      const dyn: Term[] = [
        { name: v.soc(j, t), coef: 1 },
        { name: v.c(j, t), coef: -dh * st.chargeEfficiency },
        { name: v.d(j, t), coef: dh / st.dischargeEfficiency },
      ];
      if (t > 0) dyn.push({ name: v.soc(j, t - 1), coef: -1 });
      row(`soc_${j}_${t}`, dyn, 'eq', t === 0 ? st.initialSocKwh : 0);
      // Exclusivity, always: x = 1 allows charging only, x = 0 discharging only.
      row(`xc_${j}_${t}`, [{ name: v.c(j, t), coef: 1 }, { name: v.ch(j, t), coef: -st.maxChargeKw }], 'le', 0);
      row(`xd_${j}_${t}`, [{ name: v.d(j, t), coef: 1 }, { name: v.ch(j, t), coef: st.maxDischargeKw }], 'le', st.maxDischargeKw);
    }
  });

  if (spec.reserve) {
    const { upKw, shortfallPenaltyPerKwh } = spec.reserve;
    for (let t = 0; t < T; t++) {
      const held: Term[] = [];
      spec.units.forEach((unit, i) => {
        if (!unit.providesReserve) return;
        const r = v.unitReserve(i, t);
        bound(r, 0, unit.ratingKw);
        held.push({ name: r, coef: 1 });
        if (unit.kind === 'generator') {
          row(`rh_${i}_${t}`, [{ name: r, coef: 1 }, { name: v.p(i, t), coef: 1 }, { name: v.on(i, t), coef: -unit.ratingKw }], 'le', 0);
        } else {
          row(`rh_${i}_${t}`, [{ name: r, coef: 1 }, { name: v.p(i, t), coef: -1 }, { name: v.on(i, t), coef: unit.minStableKw }], 'le', 0);
        }
      });
      spec.storage.forEach((st, j) => {
        if (!st.providesReserve) return;
        const r = v.batteryReserve(j, t);
        atLeast(r, 0);
        held.push({ name: r, coef: 1 });
        row(`rbp_${j}_${t}`, [{ name: r, coef: 1 }, { name: v.d(j, t), coef: 1 }, { name: v.c(j, t), coef: -1 }], 'le', st.maxDischargeKw);
        if (wrong.has('reserve-energy-unlimited')) return;
        // Δh·r ≤ η·(soc − minSoc), η = ηd (right) or 1/ηd (wrong); soc at the end of step t (right) or its start (wrong).
        const eta = wrong.has('reserve-energy-divided-by-efficiency') ? 1 / st.dischargeEfficiency : st.dischargeEfficiency;
        const minSoc = wrong.has('reserve-energy-ignores-min-soc') ? 0 : st.minSocKwh;
        if (wrong.has('reserve-energy-at-step-start') && t === 0) {
          row(`rbe_${j}_${t}`, [{ name: r, coef: dh }], 'le', eta * (st.initialSocKwh - minSoc));
        } else {
          const socStep = wrong.has('reserve-energy-at-step-start') ? t - 1 : t;
          row(`rbe_${j}_${t}`, [{ name: r, coef: dh }, { name: v.soc(j, socStep), coef: -eta }], 'le', -eta * minSoc);
        }
      });
      if (shortfallPenaltyPerKwh !== null) {
        bound(v.reserveShort(t), 0, upKw[t]);
        gain(v.reserveShort(t), -dh * shortfallPenaltyPerKwh);
        held.push({ name: v.reserveShort(t), coef: 1 });
      }
      row(`res_${t}`, held, 'ge', upKw[t]);
    }
  }

  spec.grid.demandCharges.forEach((charge, c) => {
    const reading: WindowReading = {
      utc: wrong.has('demand-window-in-utc'),
      toInclusive: wrong.has('demand-window-to-inclusive'),
      fromExclusive: wrong.has('demand-window-from-exclusive'),
    };
    // The peak above existingPeakKw: P − existing ≥ imp_t − existing, P − existing ≥ 0.
    const existing = wrong.has('demand-existing-peak-ignored') ? 0 : charge.existingPeakKw;
    atLeast(v.peakExcess(c), 0);
    gain(v.peakExcess(c), -charge.pricePerKw);
    if (wrong.has('demand-existing-peak-not-subtracted')) objectiveOffset -= charge.pricePerKw * existing;
    for (const t of windowSteps(spec.horizon, charge, reading)) {
      row(`dc_${c}_${t}`, [{ name: v.peakExcess(c), coef: 1 }, { name: v.imp(t), coef: -1 }], 'ge', -existing);
    }
  });

  const flagged = spec.storage.map((st, j) => ({ st, j })).filter(({ st }) => st.chargeFromSupplyOnly);
  if (flagged.length > 0 && !wrong.has('supply-only-omitted')) {
    for (let t = 0; t < T; t++) {
      if (wrong.has('supply-only-no-charging-while-importing')) {
        binary(v.importing(t));
        row(`soi_${t}`, [{ name: v.imp(t), coef: 1 }, { name: v.importing(t), coef: -spec.grid.importLimitKw }], 'le', 0);
        for (const { st, j } of flagged) {
          row(`sox_${j}_${t}`, [{ name: v.c(j, t), coef: 1 }, { name: v.importing(t), coef: st.maxChargeKw }], 'le', st.maxChargeKw);
        }
        continue;
      }
      // imp ≤ (L − u) + Σ_flex p + Σ_{unflagged} c.
      const terms: Term[] = [{ name: v.imp(t), coef: 1 }, { name: v.u(t), coef: 1 }];
      spec.units.forEach((unit, i) => { if (unit.kind === 'flexible-load') terms.push({ name: v.p(i, t), coef: -1 }); });
      spec.storage.forEach((st, j) => { if (!st.chargeFromSupplyOnly) terms.push({ name: v.c(j, t), coef: -1 }); });
      row(`so_${t}`, terms, 'le', spec.siteLoad.kw[t]);
    }
  }

  spec.stores.forEach((store, m) => {
    const keep = wrong.has('store-loss-omitted') ? 1 : 1 - store.lossPerHour * dh;
    const final = wrong.has('store-final-omitted') ? null : store.final;
    for (let t = 0; t < T; t++) {
      const floor = t === T - 1 && final !== null ? Math.max(store.min, final) : store.min;
      bound(v.level(m, t), floor, store.capacity);
      const demand = store.demandPerHour[t];
      bound(v.storeShort(m, t), 0, store.shortfallPenaltyPerUnit === null ? 0 : demand);
      if (store.shortfallPenaltyPerUnit !== null) gain(v.storeShort(m, t), -dh * store.shortfallPenaltyPerUnit);
      if (store.spillAllowed) atLeast(v.spill(m, t), 0);
      else bound(v.spill(m, t), 0, 0);
      // level_t − keep·level_{t−1} − Δh·(made − used + short − spill) = −Δh·demand.
      const terms: Term[] = [
        { name: v.level(m, t), coef: 1 },
        { name: v.storeShort(m, t), coef: -dh },
        { name: v.spill(m, t), coef: dh },
      ];
      spec.units.forEach((unit, i) => {
        if (unit.produces?.store === m) terms.push({ name: v.p(i, t), coef: -dh * unit.produces.perKwh });
        if (unit.consumes?.store === m) terms.push({ name: v.p(i, t), coef: dh * unit.consumes.perKwh });
      });
      if (t > 0) terms.push({ name: v.level(m, t - 1), coef: -keep });
      const carried = t > 0 ? 0 : (wrong.has('store-loss-not-on-initial-level') ? 1 : keep) * store.initial;
      row(`lvl_${m}_${t}`, terms, 'eq', carried - dh * demand);
    }
  });

  // Balance: sources − sinks = load.
  for (let t = 0; t < T; t++) {
    const terms: Term[] = [
      { name: v.g(t), coef: 1 },
      { name: v.imp(t), coef: 1 },
      { name: v.u(t), coef: 1 },
      { name: v.exp(t), coef: -1 },
    ];
    spec.units.forEach((unit, i) => terms.push({ name: v.p(i, t), coef: unit.kind === 'generator' ? 1 : -1 }));
    spec.storage.forEach((_st, j) => terms.push({ name: v.d(j, t), coef: 1 }, { name: v.c(j, t), coef: -1 }));
    row(`bal_${t}`, terms, 'eq', spec.siteLoad.kw[t]);
  }

  return {
    lp: {
      name: 'plain',
      objective: { direction: G.GLP_MAX, name: 'value', vars: objective.filter((term) => term.coef !== 0) },
      // A row left with no variables stays: 0 ≥ 5 (a reserve nobody can hold) makes the model infeasible.
      subjectTo: rows.map((r) => ({ ...r, vars: r.vars.filter((term) => term.coef !== 0) })),
      bounds,
      binaries,
    },
    objectiveOffset,
    matrixRange: [minCoef, maxCoef],
  };
}

export interface PlainSolution {
  /** GLPK's status: 'optimal' | 'feasible' (time limit) | 'infeasible' | 'undefined'. */
  status: 'optimal' | 'feasible' | 'infeasible' | 'undefined';
  objective: number;
  schedule: Schedule;
  seconds: number;
}

function statusOf(G: Glpk, result: Result): PlainSolution['status'] {
  switch (result.result.status) {
    case G.GLP_OPT: return 'optimal';
    case G.GLP_FEAS: return 'feasible';
    case G.GLP_NOFEAS:
    case G.GLP_INFEAS: return 'infeasible';
    default: return 'undefined';
  }
}

/**
 * The spinning reserve each provider can hold at the schedule's setpoints (SPEC §5), summed per
 * step: a generator's rating·on − p, a flexible load's p − minStable·on, a battery's unused
 * discharge plus the charging it can stop, limited by the energy above its minimum at the end
 * of the step.
 */
export function reserveHeadroom(spec: ResolvedSiteSpec, schedule: Pick<Schedule, 'units' | 'storage'>): number[] {
  const dh = spec.horizon.stepMinutes / 60;
  return Array.from({ length: spec.horizon.steps }, (_, t) => {
    let held = 0;
    for (const unit of spec.units) {
      if (!unit.providesReserve) continue;
      const { on, powerKw } = schedule.units[unit.id];
      const room = unit.kind === 'generator' ? unit.ratingKw * on[t] - powerKw[t] : powerKw[t] - unit.minStableKw * on[t];
      held += Math.max(0, room);
    }
    for (const st of spec.storage) {
      if (!st.providesReserve) continue;
      const { chargeKw, dischargeKw, socKwh } = schedule.storage[st.id];
      const byPower = st.maxDischargeKw - dischargeKw[t] + chargeKw[t];
      const byEnergy = (st.dischargeEfficiency * (socKwh[t] - st.minSocKwh)) / dh;
      held += Math.max(0, Math.min(byPower, byEnergy));
    }
    return held;
  });
}

/** The schedule read back from a solution's variable values (on/off rounded to 0/1). */
export function scheduleFromValues(spec: ResolvedSiteSpec, value: (name: string) => number): Schedule {
  const T = spec.horizon.steps;
  const steps = Array.from({ length: T }, (_, t) => t);
  const start = Date.parse(spec.horizon.start);
  const series = (name: (t: number) => string) => steps.map((t) => value(name(t)));
  const g = series(v.g);
  const units = Object.fromEntries(spec.units.map((unit, i) => [unit.id, {
    on: steps.map((t) => (value(v.on(i, t)) > 0.5 ? 1 : 0)),
    powerKw: steps.map((t) => value(v.p(i, t))),
  }]));
  const storage = Object.fromEntries(spec.storage.map((st, j) => [st.id, {
    chargeKw: steps.map((t) => value(v.c(j, t))),
    dischargeKw: steps.map((t) => value(v.d(j, t))),
    socKwh: steps.map((t) => value(v.soc(j, t))),
  }]));
  let reserve: Schedule['reserve'] = null;
  if (spec.reserve) {
    const required = spec.reserve.upKw;
    const provided = reserveHeadroom(spec, { units, storage });
    reserve = { requiredKw: required.slice(), providedKw: provided, shortfallKw: provided.map((held, t) => Math.max(0, required[t] - held)) };
  }
  return {
    timestamps: steps.map((t) => new Date(start + t * spec.horizon.stepMinutes * 60_000).toISOString()),
    supplyUsedKw: g,
    curtailedKw: steps.map((t) => spec.supply.availableKw[t] - g[t]),
    unservedKw: series(v.u),
    grid: { importKw: series(v.imp), exportKw: series(v.exp) },
    units,
    storage,
    stores: Object.fromEntries(spec.stores.map((store, m) => [store.id, {
      level: steps.map((t) => value(v.level(m, t))),
      shortfall: steps.map((t) => value(v.storeShort(m, t))),
      spill: steps.map((t) => value(v.spill(m, t))),
    }])),
    reserve,
    marginalValues: { energyPerKwh: steps.map(() => null), stores: Object.fromEntries(spec.stores.map((store) => [store.id, steps.map(() => null)])) },
  };
}

export async function solvePlain(
  spec: ResolvedSiteSpec,
  solve: { mipGap?: number; timeLimitSeconds?: number } & PlainOptions = {},
): Promise<PlainSolution> {
  const G = await glpk();
  const { lp, objectiveOffset } = await buildPlainModel(spec, solve);
  const started = performance.now();
  const result = G.solve(lp, {
    msglev: G.GLP_MSG_OFF,
    mipgap: solve.mipGap ?? 0,
    ...(solve.timeLimitSeconds !== undefined ? { tmlim: solve.timeLimitSeconds } : {}),
  });
  const seconds = (performance.now() - started) / 1000;
  const vars = result.result.vars;
  return {
    status: statusOf(G, result),
    objective: result.result.z + objectiveOffset,
    schedule: scheduleFromValues(spec, (name) => vars[name] ?? 0),
    seconds,
  };
}

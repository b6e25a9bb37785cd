/**
 * A plain, deliberately unclever MILP of SPEC.md §2, written for checks from outside the engine.
 *
 * Nothing is pruned, tightened or scaled: every unit has on/start/stop binaries at every step,
 * every battery and the grid have an exclusivity binary at every step, powers are in kW and
 * money as given. Minimum up/down use the textbook start/stop form:
 *   start_t − stop_t = on_t − on_{t−1},  start_t + stop_t ≤ 1,
 *   Σ_{τ=t−U+1..t} start_τ ≤ on_t,       Σ_{τ=t−D+1..t} stop_τ ≤ 1 − on_t,
 * with steps before 0 taken from the initial state (a unit on for k < U steps is fixed on for
 * the first U − k steps; likewise off for k < D). Rows only reach back into the horizon, so
 * blocks at the end are cut short by the horizon as SPEC §2 allows.
 *
 * The model is a glpk.js LP object; GLPK solves it in-process, and `toCplexLp` gives the same
 * model as CPLEX-LP text for Debian's glpsol / cbc.
 */
import GLPK from 'glpk.js/node';
import type { LP, Result } from 'glpk.js/node';
import type { ResolvedSiteSpec } from '@gridwright/shared/site-spec';
import type { Schedule } from '@gridwright/shared/run-result';

type Glpk = Awaited<ReturnType<typeof GLPK>>;
type Term = { name: string; coef: number };

export interface PlainOptions {
  /**
   * The M in `p ≤ M·on` (the unit capacity link). Absent: each unit's rating, the natural
   * choice. The big-M check sets it to 1e10 to show what an arbitrary large constant does.
   */
  capacityBigM?: number;
}

export interface PlainModel {
  lp: LP;
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
const v = {
  g: (t: number) => `g_${t}`,
  imp: (t: number) => `imp_${t}`,
  exp: (t: number) => `exp_${t}`,
  grid: (t: number) => `gi_${t}`,
  u: (t: number) => `u_${t}`,
  on: (i: number, t: number) => `y_${i}_${t}`,
  start: (i: number, t: number) => `z_${i}_${t}`,
  stop: (i: number, t: number) => `w_${i}_${t}`,
  p: (i: number, t: number) => `p_${i}_${t}`,
  c: (j: number, t: number) => `c_${j}_${t}`,
  d: (j: number, t: number) => `d_${j}_${t}`,
  soc: (j: number, t: number) => `s_${j}_${t}`,
  ch: (j: number, t: number) => `x_${j}_${t}`,
};

export async function buildPlainModel(spec: ResolvedSiteSpec, options: PlainOptions = {}): Promise<PlainModel> {
  const G = await glpk();
  const T = spec.horizon.steps;
  const dh = spec.horizon.stepMinutes / 60;
  const objective: Term[] = [];
  const rows: LP['subjectTo'] = [];
  const bounds: NonNullable<LP['bounds']> = [];
  const binaries: string[] = [];
  let minCoef = Number.POSITIVE_INFINITY;
  let maxCoef = 0;

  const bound = (name: string, lb: number, ub: number) => {
    bounds.push({ name, type: lb === ub ? G.GLP_FX : G.GLP_DB, lb, ub });
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

  const hard = spec.siteLoad.unservedPenaltyPerKwh === null;
  for (let t = 0; t < T; t++) {
    bound(v.g(t), 0, spec.supply.availableKw[t]);
    bound(v.u(t), 0, hard ? 0 : spec.siteLoad.kw[t]);
    bound(v.imp(t), 0, spec.grid.importLimitKw);
    bound(v.exp(t), 0, spec.grid.exportLimitKw);
    objective.push(
      { name: v.exp(t), coef: dh * spec.grid.exportPrice[t] },
      { name: v.imp(t), coef: -dh * spec.grid.importPrice[t] },
    );
    if (!hard) objective.push({ name: v.u(t), coef: -dh * (spec.siteLoad.unservedPenaltyPerKwh ?? 0) });
    // Grid exclusivity, always: gi = 1 allows import only, gi = 0 export only.
    binary(v.grid(t));
    row(`gimp_${t}`, [{ name: v.imp(t), coef: 1 }, { name: v.grid(t), coef: -spec.grid.importLimitKw }], 'le', 0);
    row(`gexp_${t}`, [{ name: v.exp(t), coef: 1 }, { name: v.grid(t), coef: spec.grid.exportLimitKw }], 'le', spec.grid.exportLimitKw);
  }

  spec.units.forEach((unit, i) => {
    const M = options.capacityBigM ?? unit.ratingKw;
    const value = unit.kind === 'generator' ? -unit.curve[0].perKwh : unit.curve[0].perKwh;
    const init = unit.initial.on ? 1 : 0;
    // Steps fixed by the initial state: still owed on-time or off-time.
    const owedOn = unit.initial.on ? Math.max(0, unit.minUpSteps - unit.initial.stepsInState) : 0;
    const owedOff = unit.initial.on ? 0 : Math.max(0, unit.minDownSteps - unit.initial.stepsInState);
    for (let t = 0; t < T; t++) {
      binary(v.on(i, t));
      binary(v.start(i, t));
      binary(v.stop(i, t));
      bound(v.p(i, t), 0, unit.ratingKw);
      objective.push({ name: v.p(i, t), coef: dh * value }, { name: v.start(i, t), coef: -unit.startupCost.hot });
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
    }
  });

  spec.storage.forEach((st, j) => {
    for (let t = 0; t < T; t++) {
      bound(v.c(j, t), 0, st.maxChargeKw);
      bound(v.d(j, t), 0, st.maxDischargeKw);
      const floor = t === T - 1 && st.finalSocKwh !== null ? Math.max(st.minSocKwh, st.finalSocKwh) : st.minSocKwh;
      bound(v.soc(j, t), floor, st.capacityKwh);
      binary(v.ch(j, t));
      objective.push({ name: v.d(j, t), coef: -dh * st.cycleCostPerKwh });
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
      subjectTo: rows.map((r) => ({ ...r, vars: r.vars.filter((term) => term.coef !== 0) })).filter((r) => r.vars.length > 0),
      bounds,
      binaries,
    },
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

/** The schedule read back from a solution's variable values (on/off rounded to 0/1). */
export function scheduleFromValues(spec: ResolvedSiteSpec, value: (name: string) => number): Schedule {
  const T = spec.horizon.steps;
  const steps = Array.from({ length: T }, (_, t) => t);
  const start = Date.parse(spec.horizon.start);
  const series = (name: (t: number) => string) => steps.map((t) => value(name(t)));
  const g = series(v.g);
  return {
    timestamps: steps.map((t) => new Date(start + t * spec.horizon.stepMinutes * 60_000).toISOString()),
    supplyUsedKw: g,
    curtailedKw: steps.map((t) => spec.supply.availableKw[t] - g[t]),
    unservedKw: series(v.u),
    grid: { importKw: series(v.imp), exportKw: series(v.exp) },
    units: Object.fromEntries(spec.units.map((unit, i) => [unit.id, {
      on: steps.map((t) => (value(v.on(i, t)) > 0.5 ? 1 : 0)),
      powerKw: steps.map((t) => value(v.p(i, t))),
    }])),
    storage: Object.fromEntries(spec.storage.map((st, j) => [st.id, {
      chargeKw: steps.map((t) => value(v.c(j, t))),
      dischargeKw: steps.map((t) => value(v.d(j, t))),
      socKwh: steps.map((t) => value(v.soc(j, t))),
    }])),
    stores: {},
    reserve: null,
    marginalValues: { energyPerKwh: steps.map(() => null), stores: {} },
  };
}

export async function solvePlain(
  spec: ResolvedSiteSpec,
  solve: { mipGap?: number; timeLimitSeconds?: number } & PlainOptions = {},
): Promise<PlainSolution> {
  const G = await glpk();
  const { lp } = await buildPlainModel(spec, solve);
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
    objective: result.result.z,
    schedule: scheduleFromValues(spec, (name) => vars[name] ?? 0),
    seconds,
  };
}

/**
 * The same model as CPLEX-LP text for Debian's glpsol (--lp) and cbc. Written here rather than
 * with glpk.js's writer, so the command-line solvers read text that GLPK's code never produced.
 */
export async function toCplexLp(model: PlainModel): Promise<string> {
  const G = await glpk();
  const { lp } = model;
  const num = (x: number) => (Number.isInteger(x) ? String(x) : x.toPrecision(17).replace(/\.?0+$/, ''));
  const terms = (vars: Term[]) => {
    const parts = vars.map((term) => `${term.coef < 0 ? '-' : '+'} ${num(Math.abs(term.coef))} ${term.name}`);
    const lines: string[] = [];
    for (let i = 0; i < parts.length; i += 8) lines.push(`  ${parts.slice(i, i + 8).join(' ')}`);
    return lines.length ? lines.join('\n') : '  0 g_0';
  };
  const out: string[] = [lp.objective.direction === G.GLP_MAX ? 'Maximize' : 'Minimize', ` obj:\n${terms(lp.objective.vars)}`, 'Subject To'];
  for (const row of lp.subjectTo) {
    const sense = row.bnds.type === G.GLP_UP ? '<=' : row.bnds.type === G.GLP_LO ? '>=' : '=';
    const rhs = row.bnds.type === G.GLP_LO ? row.bnds.lb : row.bnds.ub;
    out.push(` ${row.name}:\n${terms(row.vars)}\n  ${sense} ${num(rhs)}`);
  }
  out.push('Bounds');
  const binaries = new Set(lp.binaries ?? []);
  for (const b of lp.bounds ?? []) {
    if (binaries.has(b.name)) continue;
    out.push(b.lb === b.ub ? ` ${b.name} = ${num(b.lb)}` : ` ${num(b.lb)} <= ${b.name} <= ${num(b.ub)}`);
  }
  if (binaries.size) out.push('Binaries', ...[...binaries].map((name) => ` ${name}`));
  out.push('End', '');
  return out.join('\n');
}

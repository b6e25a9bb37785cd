/**
 * The plain formulation as CPLEX-LP text, solved by Debian's command-line solvers (glpsol 5.0 and
 * cbc 2.10.8), and every answer they give checked against the model itself: each binary within
 * 1e-6 of 0 or 1, each bound and each row held, and the objective recomputed from the values.
 * PLATFORM.md saw cbc's preprocessing call fractional integers on an infeasible model optimal,
 * so cbc runs with `preprocess off` and is never believed unchecked. On some small infeasible
 * models cbc 2.10.8 crashes (SIGSEGV) with preprocessing off; it is then run once more with its
 * defaults, and that answer goes through the same checks.
 *
 * The text is written here rather than with glpk.js's writer, so the command-line solvers read
 * text that GLPK's code never produced.
 */
import { execFileSync } from 'node:child_process';
import { existsSync, readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { glpk, type PlainModel } from './plain-formulation';

export const GLPSOL = '/usr/bin/glpsol';
export const CBC = '/usr/bin/cbc';
/** `npm test` installs both (as root); elsewhere they may be missing, but never in CI. */
export const commandLineSolversPresent = existsSync(GLPSOL) && existsSync(CBC);

/** The column that carries the objective's constant, fixed at 1. */
const OFFSET_COLUMN = 'k_offset';

type Term = { name: string; coef: number };

/** The shortest text that reads back as the same double (CPLEX-LP accepts 1e-10 and 2.5e+21). */
const num = (x: number) => String(x);

export async function toCplexLp(model: PlainModel): Promise<string> {
  const G = await glpk();
  const { lp } = model;
  const terms = (vars: Term[]) => {
    const parts = vars.map((term) => `${term.coef < 0 ? '-' : '+'} ${num(Math.abs(term.coef))} ${term.name}`);
    const lines: string[] = [];
    for (let i = 0; i < parts.length; i += 8) lines.push(`  ${parts.slice(i, i + 8).join(' ')}`);
    return lines.length ? lines.join('\n') : '  0 g_0';
  };
  const objective = model.objectiveOffset === 0 ? lp.objective.vars : [...lp.objective.vars, { name: OFFSET_COLUMN, coef: model.objectiveOffset }];
  const out: string[] = [lp.objective.direction === G.GLP_MAX ? 'Maximize' : 'Minimize', ` obj:\n${terms(objective)}`, 'Subject To'];
  for (const row of lp.subjectTo) {
    const sense = row.bnds.type === G.GLP_UP ? '<=' : row.bnds.type === G.GLP_LO ? '>=' : '=';
    const rhs = row.bnds.type === G.GLP_LO ? row.bnds.lb : row.bnds.ub;
    out.push(` ${row.name}:\n${terms(row.vars)}\n  ${sense} ${num(rhs)}`);
  }
  out.push('Bounds');
  if (model.objectiveOffset !== 0) out.push(` ${OFFSET_COLUMN} = 1`);
  const binaries = new Set(lp.binaries ?? []);
  for (const b of lp.bounds ?? []) {
    if (binaries.has(b.name)) continue;
    if (b.type === G.GLP_LO) out.push(` ${b.name} >= ${num(b.lb)}`);
    else out.push(b.lb === b.ub ? ` ${b.name} = ${num(b.lb)}` : ` ${num(b.lb)} <= ${b.name} <= ${num(b.ub)}`);
  }
  if (binaries.size) out.push('Binaries', ...[...binaries].map((name) => ` ${name}`));
  out.push('End', '');
  return out.join('\n');
}

export interface LpTextAnswer {
  solver: 'glpsol' | 'cbc';
  /** What the solver says; 'optimal' is believed only together with an empty `violations`. */
  status: 'optimal' | 'infeasible' | 'other';
  /** The solver's objective, including the constant. */
  objective: number;
  value: (name: string) => number;
  /** What is wrong with the solver's point in the model (empty for an infeasible answer). */
  violations: string[];
  /** The objective recomputed from the point. */
  recomputedObjective: number;
  /** Wall time from starting the solver to its answer read back (both runs when cbc ran twice). */
  seconds: number;
}

/** Column names in the order GLPK's CPLEX-LP reader creates them: first appearance in the text. */
function columnsInTextOrder(text: string): string[] {
  const seen = new Set<string>();
  const order: string[] = [];
  const body = text.split('\n').filter((line) => !/^(Maximize|Minimize|Subject To|Bounds|Binaries|End)\s*$/.test(line));
  for (const line of body) {
    for (const token of line.replace(/^\s*\w+:/, '').split(/\s+/)) {
      if (/^[A-Za-z][A-Za-z0-9_]*$/.test(token) && !seen.has(token)) {
        seen.add(token);
        order.push(token);
      }
    }
  }
  return order;
}

/**
 * The model's violations at a point: bounds, integrality and rows, each with a tolerance of
 * 1e-6 relative to the magnitudes involved (plus 1e-6 absolute).
 */
export async function pointViolations(model: PlainModel, value: (name: string) => number): Promise<string[]> {
  const G = await glpk();
  const found: string[] = [];
  const tol = (scale: number) => 1e-6 * (1 + Math.abs(scale));
  for (const b of model.lp.bounds ?? []) {
    const x = value(b.name);
    if (x < b.lb - tol(b.lb)) found.push(`${b.name} = ${x} below ${b.lb}`);
    if (b.type !== G.GLP_LO && x > b.ub + tol(b.ub)) found.push(`${b.name} = ${x} above ${b.ub}`);
  }
  for (const name of model.lp.binaries ?? []) {
    const x = value(name);
    if (Math.abs(x - Math.round(x)) > 1e-6) found.push(`${name} = ${x} is not integral`);
  }
  for (const row of model.lp.subjectTo) {
    let activity = 0;
    let scale = Math.abs(row.bnds.ub);
    for (const term of row.vars) {
      activity += term.coef * value(term.name);
      scale = Math.max(scale, Math.abs(term.coef * value(term.name)));
    }
    const { type, lb, ub } = row.bnds;
    const low = type === G.GLP_LO || type === G.GLP_FX;
    const high = type === G.GLP_UP || type === G.GLP_FX;
    if (low && activity < lb - tol(scale)) found.push(`row ${row.name}: ${activity} < ${lb}`);
    if (high && activity > ub + tol(scale)) found.push(`row ${row.name}: ${activity} > ${ub}`);
  }
  return found;
}

function recompute(model: PlainModel, value: (name: string) => number): number {
  return model.lp.objective.vars.reduce((sum, term) => sum + term.coef * value(term.name), model.objectiveOffset);
}

export interface LpTextRun {
  /** A folder for the .lp file and the solvers' output. */
  dir: string;
  /** File name stem. */
  name: string;
  /** cbc's `threads` (default 1). */
  threads?: number;
  /** cbc's `ratioGap`, the relative MIP gap it stops at (default: its own, 0). */
  ratioGap?: number;
}

interface RawAnswer {
  status: LpTextAnswer['status'];
  objective: number;
  values: Map<string, number>;
}

function runGlpsol(lpFile: string, text: string, out: string): RawAnswer {
  execFileSync(GLPSOL, ['--lp', lpFile, '-w', out], { stdio: 'ignore' });
  const raw = readFileSync(out, 'utf8');
  const statusLine = /^c Status:\s+(.*)$/m.exec(raw)?.[1] ?? '';
  const columns = columnsInTextOrder(text);
  const values = new Map<string, number>();
  for (const match of raw.matchAll(/^j (\d+) (\S+)/gm)) values.set(columns[Number(match[1]) - 1], Number(match[2]));
  return {
    status: /OPTIMAL/.test(statusLine) ? 'optimal' : /EMPTY|INFEASIBLE|NO PRIMAL/.test(statusLine) ? 'infeasible' : 'other',
    objective: Number(/^s \w+ \d+ \d+ \w (\S+)$/m.exec(raw)?.[1]),
    values,
  };
}

function runCbc(lpFile: string, out: string, threads: number, ratioGap: number | undefined): RawAnswer {
  const gap = ratioGap === undefined ? [] : ['ratioGap', String(ratioGap)];
  const run = (preprocess: string[]) =>
    execFileSync(CBC, [lpFile, ...preprocess, ...gap, 'threads', String(threads), 'solve', 'solu', out, 'quit'], { stdio: 'ignore' });
  try {
    run(['preprocess', 'off']);
  } catch (error) {
    if ((error as { signal?: string }).signal !== 'SIGSEGV') throw error;
    run([]);
  }
  const sol = readFileSync(out, 'utf8');
  const head = sol.split('\n')[0];
  const values = new Map<string, number>();
  for (const match of sol.matchAll(/^\s*(?:\*\*\s*)?\d+\s+(\S+)\s+(\S+)\s+\S+\s*$/gm)) values.set(match[1], Number(match[2]));
  return {
    status: /^Optimal/.test(head) ? 'optimal' : /infeasible/i.test(head) ? 'infeasible' : 'other',
    objective: Number(/objective value\s+(\S+)/.exec(head)?.[1]),
    values,
  };
}

/** Solves the model's CPLEX-LP text with glpsol or cbc and checks the answer against the model. */
export async function solveLpText(model: PlainModel, solver: 'glpsol' | 'cbc', run: LpTextRun): Promise<LpTextAnswer> {
  const text = await toCplexLp(model);
  const lpFile = path.join(run.dir, `${run.name}.lp`);
  writeFileSync(lpFile, text);
  const started = performance.now();
  const { status, objective, values } = solver === 'glpsol'
    ? runGlpsol(lpFile, text, path.join(run.dir, `${run.name}.glpsol.raw`))
    : runCbc(lpFile, path.join(run.dir, `${run.name}.cbc.sol`), run.threads ?? 1, run.ratioGap);
  const seconds = (performance.now() - started) / 1000;
  const value = (name: string) => (name === OFFSET_COLUMN ? 1 : (values.get(name) ?? 0));
  return {
    solver,
    status,
    objective,
    value,
    violations: status === 'optimal' ? await pointViolations(model, value) : [],
    recomputedObjective: recompute(model, value),
    seconds,
  };
}

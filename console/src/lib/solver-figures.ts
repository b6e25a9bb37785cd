import { formatNumber } from './format';

/** Below this a solver's figure is float noise (HiGHS's default tolerances are 1e-7): shown as 0, never "-0". */
const NOISE = 5e-7;

/** A figure of a schedule or its objective, its float noise (and anything that rounds to "-0") shown as 0. */
export function formatSolverFigure(n: number | null | undefined): string {
  const text = formatNumber(n !== null && n !== undefined && Math.abs(n) < NOISE ? 0 : n);
  return text === '-0' ? '0' : text;
}

/** A difference between two figures, with its sign: "+12.5", "−3", or "0" within the noise. */
export function formatSolverChange(n: number): string {
  if (Math.abs(n) < NOISE) return '0';
  return `${n > 0 ? '+' : '−'}${formatNumber(Math.abs(n))}`;
}

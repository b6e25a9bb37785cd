import { describe, expect, it } from 'vitest';
import { formatSolverChange, formatSolverFigure } from './solver-figures';

describe('solver figures', () => {
  it('shows float noise as 0 and keeps real figures and missing ones as formatNumber does', () => {
    expect(formatSolverFigure(-1e-12)).toBe('0');
    expect(formatSolverFigure(-0.004)).toBe('0');
    expect(formatSolverFigure(-239.334)).toBe('-239.33');
    expect(formatSolverFigure(null)).toBe('—');
  });

  it('signs a change and calls noise no change', () => {
    expect(formatSolverChange(12.5)).toBe('+12.5');
    expect(formatSolverChange(-3)).toBe('−3');
    expect(formatSolverChange(2e-9)).toBe('0');
  });
});

import type { ResolvedSiteSpec } from '@gridwright/shared/site-spec';
import { buildWindowModel } from './build-window-model';
import { initialState } from './carry-state';
import { chooseSolveMode } from './choose-solve-mode';
import { monolithicWindow, rollingSegments } from './horizon-windows';
import { planWindow, siteFacts } from './plan-window';

export interface ModelSizeEstimate {
  mode: 'monolithic' | 'rolling';
  windows: number;
  /** Rolling: sequences of windows solved side by side (each seam adds one probe window). */
  segments: number;
  variables: number;
  binaries: { before: number; after: number };
  constraints: number;
}

/**
 * The model's size without solving. Monolithic: the exact counts of the one model. Rolling:
 * the first window's counts scaled to all windows by their steps (later windows start from
 * states not known before solving, so their exact sets are not either).
 */
export function estimateModelSize(spec: ResolvedSiteSpec): ModelSizeEstimate {
  const mode = chooseSolveMode(spec);
  const segments = mode === 'rolling' ? rollingSegments(spec) : [{ windows: monolithicWindow(spec) }];
  const windows = segments.flatMap((s) => s.windows);
  const first = windows[0];
  const plan = planWindow(spec, siteFacts(spec), first, initialState(spec));
  const built = buildWindowModel(plan);
  const totalSteps = windows.reduce((n, w) => n + w.steps, 0);
  const factor = totalSteps / first.steps;
  const scale = (v: number) => Math.round(v * factor);
  return {
    mode,
    windows: windows.length,
    segments: segments.length,
    variables: scale(built.model.numCols),
    binaries: { before: scale(plan.binariesBefore), after: scale(built.binaries) },
    constraints: scale(built.model.numRows),
  };
}

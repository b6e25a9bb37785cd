import { afterAll, describe, expect, it } from 'vitest';
import type { ResolvedSiteSpec } from '@gridwright/shared/site-spec';
import { rollingSegments, rollingWindows } from '../../api/src/engine/horizon-windows';
import { HighsSolverPool } from '../../api/src/solver/highs-solver-pool';
import { solveSite, type SiteSolution } from '../../api/src/engine/solve-site';
import { gridTiedSolarSite, resolve } from './synthetic-sites';

const pool = new HighsSolverPool({ size: 2 });
afterAll(() => pool.close());

const withWindow = (spec: ResolvedSiteSpec, window: Partial<ResolvedSiteSpec['solver']['window']>): ResolvedSiteSpec => ({
  ...spec,
  solver: { ...spec.solver, mode: 'rolling', window: { ...spec.solver.window, ...window } },
});

const windowsOf = (r: SiteSolution) => r.model.windows.filter((w) => w.kind === 'window');
const probesOf = (r: SiteSolution) => r.model.windows.filter((w) => w.kind === 'seam-probe');

/** The committed windows tile the horizon: each starts where the previous one's kept steps end. */
function expectTiled(r: SiteSolution, steps: number): void {
  let next = 0;
  for (const w of windowsOf(r)) {
    expect(w.fromStep).toBe(next);
    next += w.committedSteps;
  }
  expect(next).toBe(steps);
}

function generatorSite(steps: number, initial?: { on: boolean; stepsInState: number }, minUpSteps = 4): ResolvedSiteSpec {
  // Exports pay in isolated steps only, so the minimum up and down times decide the blocks.
  const exportPrice = Array.from({ length: steps }, (_, t) => (t % 5 === 4 || t % 7 === 0 ? 0.5 : 0.05));
  return resolve({
    horizon: { start: '2027-01-01T00:00:00Z', stepMinutes: 60, steps },
    supply: { availableKw: new Array(steps).fill(0) },
    grid: { exportLimitKw: 100, exportPrice },
    units: [{ id: 'gen', kind: 'generator', ratingKw: 40, minStableKw: 30, costPerKwh: 0.2, startupCost: 1, minUpSteps, minDownSteps: 3, ...(initial ? { initial } : {}) }],
    solver: { mode: 'rolling', window: { windowSteps: 6, commitSteps: 4, segmentWindows: 2 } },
  });
}

describe('rolling segments', () => {
  it('cuts the windows into segments of about segmentWindows, each ending where the next starts', () => {
    const spec = withWindow(resolve({ horizon: { start: '2027-01-01T00:00:00Z', stepMinutes: 60, steps: 100 }, supply: { availableKw: new Array(100).fill(1) } }), {
      windowSteps: 6,
      commitSteps: 4,
      segmentWindows: 3,
    });
    // Windows start every 4 steps; the one at 96 is the first to reach step 100: 25 windows.
    expect(rollingWindows(spec)).toHaveLength(25);
    const segments = rollingSegments(spec);
    // ⌊25 / 3⌋ = 8 segments, cut at every third window start; the last takes the remaining 4.
    expect(segments.map((s) => s.from)).toEqual([0, 12, 24, 36, 48, 60, 72, 84]);
    expect(segments.map((s) => s.windows.length)).toEqual([3, 3, 3, 3, 3, 3, 3, 4]);
    for (const s of segments) {
      const last = s.windows.at(-1)!;
      expect(last.from + last.steps).toBe(s.to);
      expect(last.commit).toBe(last.steps);
      expect(last.isFinal).toBe(s.to === 100);
    }
    expect(segments.flatMap((s) => s.windows.map((w) => w.from))).toEqual(rollingWindows(spec).map((w) => w.from));

    expect(rollingSegments(withWindow(spec, { segmentWindows: 13 }))).toHaveLength(1);
    expect(rollingSegments(withWindow(spec, { segmentWindows: 0 }))).toHaveLength(1);
  });

  it('solves segments side by side, probing each seam, within 1 % of one sequence and never above the optimum', async () => {
    const base = resolve(gridTiedSolarSite({ days: 12, stepMinutes: 60 }));
    const segmented = await solveSite(withWindow(base, { segmentWindows: 3 }), { solver: pool });
    const sequential = await solveSite(withWindow(base, { segmentWindows: 0 }), { solver: pool });
    const optimum = await solveSite({ ...base, solver: { ...base.solver, mode: 'monolithic' } }, { solver: pool });
    // 12 daily windows in segments of 3: four segments, three seams, one probe each.
    expect(segmented.model.segments).toBe(4);
    expect(probesOf(segmented)).toHaveLength(3);
    for (const p of probesOf(segmented)) expect(p.committedSteps).toBe(0);
    expectTiled(segmented, base.horizon.steps);
    expect(sequential.model.segments).toBe(1);
    expect(probesOf(sequential)).toHaveLength(0);

    const s = segmented.objective.value!;
    const q = sequential.objective.value!;
    const m = optimum.objective.value!;
    // Any feasible schedule is at most the optimum (up to its MIP gap).
    expect(s).toBeLessThanOrEqual(m + Math.abs(m) * base.solver.mipGap + 1e-6);
    expect(Math.abs(s - q)).toBeLessThanOrEqual(0.01 * Math.abs(q));
  });

  it('keeps minimum up and down times across seams', async () => {
    const steps = 40;
    const r = await solveSite(generatorSite(steps), { solver: pool });
    expect(r.model.segments).toBeGreaterThan(1);
    const on = r.schedule!.units.gen.on;
    // Blocks of equal state; every block that ends before the horizon respects its minimum.
    let from = 0;
    for (let t = 1; t <= steps; t++) {
      if (t < steps && on[t] === on[from]) continue;
      if (t < steps) expect(t - from, `${on[from] ? 'on' : 'off'} block at step ${from}`).toBeGreaterThanOrEqual(on[from] ? 4 : from === 0 ? 1 : 3);
      from = t;
    }
  });

  it('solves on as one sequence from before a seam whose state a segment cannot reach', async () => {
    // On at the start with a minimum up time of 12 steps, the generator must run through the
    // first seam (step 8); the probe, starting with it off, leaves it off there. The first
    // segment misses the seam, so from its last window on the horizon is solved as one
    // sequence — the very windows a single sequence solves, hence the same schedule.
    const spec = generatorSite(30, { on: true, stepsInState: 0 }, 12);
    const segmented = await solveSite(spec, { solver: pool });
    const sequential = await solveSite(withWindow(spec, { segmentWindows: 0 }), { solver: pool });
    expect(rollingSegments(spec).map((s) => s.from)).toEqual([0, 8, 16]);
    // The first segment's last window (steps 4–7) was solved again with its lookahead (4–9).
    expect(windowsOf(segmented).find((w) => w.fromStep === 4)!.toStep).toBe(9);
    expect(segmented.schedule!.units.gen.on.slice(0, 12)).toEqual(new Array(12).fill(1));
    expect(segmented.objective.value!).toBeCloseTo(sequential.objective.value!, 9);
    expect(segmented.schedule!.units.gen.on).toEqual(sequential.schedule!.units.gen.on);
    expectTiled(segmented, 30);
  });

  it('goes on from the previous segment when a seam probe finds no schedule', async () => {
    // An island with a hard 10 kW load, sun in the first half of each day only, and an empty
    // battery: from step 0 (daylight) it charges in time, but the probe of the seam at step 24
    // starts at step 12, at night, with the battery empty — infeasible. (Windows of 24 steps
    // see a whole night ahead; shorter ones would leave the battery short at their end.)
    const steps = 72;
    const supply = Array.from({ length: steps }, (_, t) => (t % 24 < 12 ? 100 : 0));
    const spec = resolve({
      horizon: { start: '2027-01-01T00:00:00Z', stepMinutes: 60, steps },
      supply: { availableKw: supply },
      siteLoad: { kw: new Array(steps).fill(10) },
      storage: [{ id: 'bess', capacityKwh: 200, maxChargeKw: 50, maxDischargeKw: 50, initialSocKwh: 0 }],
      solver: { mode: 'rolling', window: { windowSteps: 24, commitSteps: 12, segmentWindows: 2 } },
    });
    expect(rollingSegments(spec).map((s) => s.from)).toEqual([0, 24]);
    const progress: [number, number][] = [];
    const r = await solveSite(spec, { solver: pool, onProgress: (p) => progress.push([p.windowsDone, p.windowsTotal]) });
    expect(r.outcome).toBe('feasible');
    const probes = probesOf(r);
    expect(probes).toHaveLength(1);
    expect(probes[0].outcome).toBe('infeasible');
    expectTiled(r, steps);
    expect(r.schedule!.unservedKw.every((u) => u === 0)).toBe(true);
    // Progress only grows, and ends complete.
    for (let i = 1; i < progress.length; i++) expect(progress[i][0]).toBeGreaterThan(progress[i - 1][0]);
    expect(progress.at(-1)![0]).toBe(progress.at(-1)![1]);
  });
});

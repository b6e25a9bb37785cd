// Shared by the runs tests: a small spec (a solve of ~0.1 s), a fast queue configuration, a
// result to finish a run with by hand, and polling for a run to reach a state through the API.
import type { Express } from 'express';
import request from 'supertest';
import type { RunResult } from '@gridwright/shared/run-result';
import type { finishRun } from '../../../api/src/runs/transitions';

/** A succeeded result with only an objective and a model size, for finishing a run without solving it. */
export const handMadeResult = (objective: number, binaries: number) =>
  ({
    status: 'succeeded',
    outcome: 'optimal',
    objective: { value: objective, bound: objective, gap: 0 },
    kpis: null,
    schedule: null,
    model: { binaries } as unknown as RunResult['model'],
    warnings: [],
  }) as unknown as Parameters<typeof finishRun>[2];

/** Queue timings short enough for tests; production defaults are in api/src/config.ts. */
export const FAST_QUEUE_ENV = {
  QUEUE_MAINTENANCE_SECONDS: '1',
  QUEUE_POLLING_SECONDS: '0.5',
  RUN_CANCEL_POLL_MS: '100',
  WEBHOOK_RETRY_DELAY_SECONDS: '1',
  WEBHOOK_TIMEOUT_MS: '2000',
};

/** An invented 8-hour site: PV-like availability, one electrolyser, one battery, a grid connection. */
export function smallSpec(overrides: Record<string, unknown> = {}) {
  return {
    name: 'Test yard',
    horizon: { start: '2027-03-01T06:00:00+01:00', stepMinutes: 60, steps: 8 },
    supply: { availableKw: [50, 180, 320, 410, 390, 260, 120, 20] },
    siteLoad: { kw: [20, 20, 25, 25, 25, 20, 20, 20] },
    grid: { importLimitKw: 100, exportLimitKw: 100, importPrice: 0.25, exportPrice: 0.04 },
    units: [{ id: 'ely-1', kind: 'flexible-load', ratingKw: 300, minStableKw: 90, valuePerKwh: 0.1, startupCost: 5, minUpSteps: 2 }],
    storage: [{ id: 'bess-1', capacityKwh: 200, maxChargeKw: 80, maxDischargeKw: 80, chargeEfficiency: 0.95, dischargeEfficiency: 0.95, initialSocKwh: 100, finalSocKwh: 100 }],
    solver: { timeLimitSeconds: 20 },
    ...overrides,
  };
}

/**
 * A spec that takes a while in rolling mode: quarter-hours in 8-hour windows committing 4 hours
 * (about 0.3 s a window here), so progress is written and there is time to cancel or kill the
 * worker mid-solve. `days` sets the number of windows (6 a day).
 */
export function slowSpec(days = 2) {
  const steps = days * 96;
  const availableKw = Array.from({ length: steps }, (_, t) => {
    const hour = (t % 96) / 4;
    return Math.round(Math.max(0, Math.sin(((hour - 6) / 12) * Math.PI)) * 900 * (0.7 + 0.3 * Math.cos(t / 37)));
  });
  return {
    name: 'Slow yard',
    horizon: { start: '2027-04-01T00:00:00+02:00', stepMinutes: 15, steps },
    supply: { availableKw },
    siteLoad: { kw: Array.from({ length: steps }, (_, t) => 60 + (t % 7)) },
    grid: { importLimitKw: 300, exportLimitKw: 300, importPrice: Array.from({ length: steps }, (_, t) => 0.18 + 0.08 * Math.sin(t / 11)), exportPrice: 0.05 },
    units: [{ id: 'ely-1', kind: 'flexible-load', ratingKw: 500, minStableKw: 150, valuePerKwh: 0.12, startupCost: 15, minUpSteps: 8, minDownSteps: 4 }],
    storage: [{ id: 'bess-1', capacityKwh: 800, maxChargeKw: 250, maxDischargeKw: 250, chargeEfficiency: 0.95, dischargeEfficiency: 0.95, initialSocKwh: 400, finalSocKwh: 400 }],
    solver: { mode: 'rolling', window: { windowSteps: 32, commitSteps: 16 }, timeLimitSeconds: 60, mipGap: 0.01 },
  };
}

export const bearer = (key: string) => ({ Authorization: `Bearer ${key}` });

export async function waitForRun(
  app: Express,
  apiKey: string,
  id: string,
  until: (run: any) => boolean = (r) => ['succeeded', 'failed', 'cancelled'].includes(r.status),
  timeoutMs = 30_000,
): Promise<any> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const res = await request(app).get(`/v1/runs/${id}`).set(bearer(apiKey));
    if (res.status !== 200) throw new Error(`GET /v1/runs/${id}: ${res.status} ${JSON.stringify(res.body)}`);
    if (until(res.body)) return res.body;
    if (Date.now() > deadline) throw new Error(`run ${id} is still ${res.body.status} after ${timeoutMs} ms`);
    await new Promise((r) => setTimeout(r, 100));
  }
}

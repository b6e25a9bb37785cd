import { MAX_STEPS, MAX_UNITS } from '@gridwright/shared/site-spec';

export const LIMIT_NAMES = ['monthlyRuns', 'monthlySolverSeconds', 'maxSteps', 'maxUnits', 'requestsPerSecond', 'concurrentRuns', 'webhookEndpoints'] as const;
export type LimitName = (typeof LIMIT_NAMES)[number];

export interface LimitRange {
  integer: boolean;
  min: number;
  /** The minimum itself is not allowed (a rate of 0 would refuse every request). */
  exclusiveMin?: boolean;
  max: number;
}

/**
 * What an operator may set a tenant's limit to. The PATCH /v1/admin/tenants/{id} schema in
 * openapi.yaml states the same ranges (a test compares them), the service checks them, and the
 * database refuses anything else (1780000500000-input-guards.ts).
 */
export const LIMIT_RANGES: Record<LimitName, LimitRange> = {
  monthlyRuns: { integer: true, min: 0, max: 1e9 },
  monthlySolverSeconds: { integer: true, min: 0, max: 1e10 },
  maxSteps: { integer: true, min: 1, max: MAX_STEPS },
  maxUnits: { integer: true, min: 0, max: MAX_UNITS },
  requestsPerSecond: { integer: false, min: 0, exclusiveMin: true, max: 1e6 },
  concurrentRuns: { integer: true, min: 1, max: 1e6 },
  webhookEndpoints: { integer: true, min: 0, max: 1e4 },
};

export const isLimitName = (name: string): name is LimitName => (LIMIT_NAMES as readonly string[]).includes(name);

/** Why `value` cannot be the limit `name`, or null when it can. */
export function limitValueRefusal(name: LimitName, value: unknown): string | null {
  const range = LIMIT_RANGES[name];
  const accepts = `${range.integer ? 'a whole number' : 'a number'} ${range.exclusiveMin ? 'above' : 'from'} ${range.min}${range.exclusiveMin ? ' and at most' : ' to'} ${range.max}`;
  if (typeof value !== 'number' || !Number.isFinite(value)) return `must be ${accepts}, or null to remove the override`;
  if (range.integer && !Number.isInteger(value)) return `must be ${accepts}`;
  if (value > range.max || value < range.min || (range.exclusiveMin && value === range.min)) return `must be ${accepts}`;
  return null;
}

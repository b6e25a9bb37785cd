import { MAX_POWER, MIN_POWER } from '@gridwright/shared/site-spec';

/**
 * Why a kW figure cannot stand in a per-step series of a site spec, or null when it can: the
 * contract's own limits (shared/src/site-spec.ts), so a value uploaded as a series meets exactly
 * what the same value written inline in a spec would.
 */
export function kwValueRefusal(kw: number): string | null {
  if (!Number.isFinite(kw)) return 'is not a finite number';
  if (kw < 0) return 'is negative; power per step is at least 0';
  if (kw > MAX_POWER) return `is above ${MAX_POWER} kW, the most a site spec holds`;
  if (kw > 0 && kw < MIN_POWER) return `is below ${MIN_POWER} kW; a site spec holds 0 or at least ${MIN_POWER} kW`;
  return null;
}

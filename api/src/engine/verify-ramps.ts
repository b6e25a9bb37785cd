import type { ResolvedSiteSpec } from '@gridwright/shared/site-spec';
import type { Tolerance } from './verify-tolerance';
import { fmt, type ViolationList } from './verify-violations';

/**
 * SPEC §5 ramps, read off the on/off and power series: while on in two steps in a row, output
 * rises by at most rampUp·stepMinutes and falls by at most rampDown·stepMinutes; a start reaches
 * at most max(minStable, that ramp) in its first step and a stop leaves from at most
 * max(minStable, the down ramp). Step −1 is the initial state (output `initial.powerKw`, or 0 when
 * off; an unknown output sets no limit at step 0).
 */
export function verifyRamps(list: ViolationList, tol: Tolerance, spec: ResolvedSiteSpec, i: number, on: readonly number[], p: readonly number[]): void {
  const u = spec.units[i];
  const minutes = spec.horizon.stepMinutes;
  const up = u.rampUpKwPerMin === null ? null : u.rampUpKwPerMin * minutes;
  const down = u.rampDownKwPerMin === null ? null : u.rampDownKwPerMin * minutes;
  if (up === null && down === null) return;
  const base = `/units/${i}`;
  let wasOn = u.initial.on ? 1 : 0;
  let before: number | null = u.initial.on ? u.initial.powerKw : 0;
  for (let t = 0; t < on.length; t++) {
    const now = p[t];
    if (before !== null) {
      if (up !== null && on[t] === 1) {
        const limit = wasOn ? before + up : Math.max(u.minStableKw, up);
        if (!tol.le(now, limit)) {
          const what = wasOn ? `rises from ${fmt(before)} to ${fmt(now)} kW, more than ${fmt(up)} kW in one step` : `starts at ${fmt(now)} kW, above its start allowance of ${fmt(limit)} kW`;
          list.add('ramp-up', `unit ${u.id} ${what} at step ${t}`, t, `${base}/rampUpKwPerMin`);
        }
      }
      if (down !== null && wasOn) {
        const floor = on[t] === 1 ? before - down : null;
        const stopLimit = Math.max(u.minStableKw, down);
        if (floor !== null && !tol.le(floor, now)) {
          list.add('ramp-down', `unit ${u.id} falls from ${fmt(before)} to ${fmt(now)} kW at step ${t}, more than ${fmt(down)} kW in one step`, t, `${base}/rampDownKwPerMin`);
        }
        if (on[t] === 0 && !tol.le(before, stopLimit)) {
          list.add('ramp-down', `unit ${u.id} stops at step ${t} from ${fmt(before)} kW, above its stop allowance of ${fmt(stopLimit)} kW`, t, `${base}/rampDownKwPerMin`);
        }
      }
    }
    wasOn = on[t];
    before = on[t] === 1 ? now : 0;
  }
}

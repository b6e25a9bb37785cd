// The console asks before solving a spec whose check found a proof of infeasibility; the list of
// those codes lives in shared/ and must name exactly the codes the engine's pre-checks write.
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { INFEASIBILITY_CODES } from '@gridwright/shared/infeasibility-codes';
import { resolveDefaults, validateSiteSpec } from '@gridwright/shared/site-spec';
import { precheckInfeasibility } from '../../api/src/engine/precheck-infeasibility';
import { specWarnings } from '../../api/src/engine/spec-warnings';

const source = readFileSync(path.resolve(import.meta.dirname, '../../api/src/engine/precheck-infeasibility.ts'), 'utf8');

describe('the codes that prove a spec infeasible', () => {
  it("are exactly the codes the engine's pre-checks write", () => {
    const written = [...source.matchAll(/code:\s*'([a-z-]+)'/g)].map((m) => m[1]);
    expect(new Set(written)).toEqual(new Set(INFEASIBILITY_CODES));
  });

  it('mark a hard load above every source, and not an advisory warning', () => {
    // Hand derivation: an island (no grid) with 10 kW of supply and a hard 50 kW load is short 40 kW at both steps.
    const checked = validateSiteSpec({
      horizon: { start: '2027-03-01T00:00:00Z', stepMinutes: 60, steps: 2 },
      supply: { availableKw: [10, 10] },
      siteLoad: { kw: [50, 50] },
      units: [{ id: 'never', kind: 'flexible-load', ratingKw: 100, minStableKw: 80 }],
    });
    if (!checked.ok) throw new Error(JSON.stringify(checked.errors));
    const spec = resolveDefaults(checked.spec);
    expect(precheckInfeasibility(spec).map((w) => w.code)).toEqual(['hard-load-exceeds-supply']);
    const advisory = specWarnings(spec).filter((w) => !INFEASIBILITY_CODES.includes(w.code));
    expect(advisory.map((w) => w.code)).toEqual(['min-stable-unreachable']);
  });
});

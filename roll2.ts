import { readFileSync } from 'node:fs';
import { resolveDefaults, validateSiteSpec } from '@gridwright/shared/site-spec';
import { solveSite } from './api/src/engine/solve-site';
import { HighsSolverPool } from './api/src/solver/highs-solver-pool';
const pool = new HighsSolverPool({ size: 2 });
const file = process.argv[2]; const times = Number(process.argv[3]);
const spec = JSON.parse(readFileSync(`shared/examples/${file}.json`, 'utf8'));
const T = spec.horizon.steps;
const rep = (a: any) => (Array.isArray(a) ? Array.from({ length: T * times }, (_, t) => a[t % T]) : a);
spec.horizon.steps = T * times; spec.supply.availableKw = rep(spec.supply.availableKw);
if (spec.siteLoad) spec.siteLoad.kw = rep(spec.siteLoad.kw);
if (spec.grid) { spec.grid.importPrice = rep(spec.grid.importPrice); spec.grid.exportPrice = rep(spec.grid.exportPrice); }
for (const st of spec.stores ?? []) st.demandPerHour = rep(st.demandPerHour);
for (const mode of ['monolithic', 'rolling']) {
  const s = structuredClone(spec); s.solver = { mode, timeLimitSeconds: 300, window: { windowSteps: 36, commitSteps: 24 } };
  const r = await solveSite(resolveDefaults((validateSiteSpec(s) as any).spec), { solver: pool });
  console.log(mode, r.objective.value?.toFixed(1), JSON.stringify(r.kpis?.objectiveTerms), JSON.stringify(r.kpis?.stores));
  const lv = r.schedule!.stores['h2-tank']?.level;
  if (lv) console.log('  level', lv.filter((_, t) => t % 6 === 5).map((x) => x.toFixed(0)).join(' '));
}
await pool.close();
{
  const s = structuredClone(spec); s.solver = { mode: 'monolithic', timeLimitSeconds: 300 };
  const r = await solveSite(resolveDefaults((validateSiteSpec(s) as any).spec), { solver: new HighsSolverPool({ size: 1 }) });
  for (const [id, v] of Object.entries(r.schedule!.marginalValues.stores)) console.log('store value', id, v.filter((_, t) => t % 4 === 0).map((x) => x?.toFixed(2)).join(' '));
  console.log('energy value', r.schedule!.marginalValues.energyPerKwh.filter((_, t) => t % 4 === 0).map((x) => x?.toFixed(3)).join(' '));
  process.exit(0);
}

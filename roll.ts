import { readFileSync } from 'node:fs';
import { resolveDefaults, validateSiteSpec } from '@gridwright/shared/site-spec';
import { solveSite } from './api/src/engine/solve-site';
import { HighsSolverPool } from './api/src/solver/highs-solver-pool';
const pool = new HighsSolverPool({ size: 2 });
function repeat(spec: any, times: number) {
  const s = structuredClone(spec);
  const T = s.horizon.steps;
  const rep = (a: any) => (Array.isArray(a) ? Array.from({ length: T * times }, (_, t) => a[t % T]) : a);
  s.horizon.steps = T * times;
  s.supply.availableKw = rep(s.supply.availableKw);
  if (s.siteLoad) s.siteLoad.kw = rep(s.siteLoad.kw);
  if (s.grid) { s.grid.importPrice = rep(s.grid.importPrice); s.grid.exportPrice = rep(s.grid.exportPrice); }
  if (s.reserve) s.reserve.upKw = rep(s.reserve.upKw);
  for (const st of s.stores ?? []) { st.demandPerHour = rep(st.demandPerHour); if (st.id === 'diesel-tank') { st.capacity = 20000; st.initial = 12000; } }
  s.solver = { ...(s.solver ?? {}), timeLimitSeconds: 300 };
  return s;
}
for (const [file, times, win, commit] of [['island-microgrid', 3, 36, 24], ['grid-electrolyser', 3, 36, 24], ['solar-pump-station', 3, 72, 48], ['warehouse-demand-charge', 3, 72, 48]] as const) {
  const raw = repeat(JSON.parse(readFileSync(`shared/examples/${file}.json`, 'utf8')), times);
  const out: string[] = [];
  for (const mode of ['monolithic', 'rolling'] as const) {
    const s = structuredClone(raw); s.solver.mode = mode; s.solver.window = { windowSteps: win, commitSteps: commit };
    const v = validateSiteSpec(s); if (!v.ok) { console.log(v.errors); continue; }
    const t0 = performance.now();
    try {
      const r = await solveSite(resolveDefaults(v.spec), { solver: pool });
      out.push(`${mode} ${r.outcome} ${r.objective.value?.toFixed(2)} ${((performance.now() - t0) / 1000).toFixed(1)}s`);
    } catch (e) { out.push(`${mode} ERROR ${(e as Error).message.slice(0, 300)}`); }
  }
  console.log(file, out.join(' | '));
}
await pool.close();

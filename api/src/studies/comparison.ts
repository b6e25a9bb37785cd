import type { Kpis, RunStatus } from '@gridwright/shared/run-result';
import type { StudyComparison } from '@gridwright/shared/studies';
import type { AppContext } from '../context';
import { combinationAt } from './grid';
import { getStudyRow } from './reading';

interface ComparisonRunRow {
  id: string;
  study_position: number;
  status: RunStatus;
  outcome: string | null;
  solver_seconds: number | null;
  objective: number | null;
  kpis: Kpis | null;
}

/**
 * The study's runs side by side: objective and its terms, energy imported, exported, curtailed
 * and unserved, unit starts and demand-charge peaks, each with a link to its run. Figures stay null
 * until a run has a schedule; `best` is the highest objective among those that have one.
 */
export async function compareStudy(ctx: AppContext, tenantId: string, id: string): Promise<StudyComparison> {
  const study = await getStudyRow(ctx, tenantId, id);
  // Only the objective and the KPIs leave the database, never the schedules.
  const runs: ComparisonRunRow[] = await ctx.db.query(
    `SELECT id, study_position, status, outcome, solver_seconds,
            CASE WHEN result->'kpis' <> 'null'::jsonb THEN (result->'objective'->>'value')::float8 END AS objective,
            nullif(result->'kpis', 'null'::jsonb) AS kpis
       FROM runs WHERE tenant_id = $1 AND study_id = $2 ORDER BY study_position`,
    [tenantId, study.id],
  );
  const rows = runs.map((r) => {
    const k = r.kpis;
    return {
      position: r.study_position,
      values: combinationAt(study.changes, r.study_position).map((pick, i) => study.changes[i].values[pick]),
      runId: r.id,
      status: r.status,
      outcome: r.outcome,
      objective: r.objective,
      objectiveTerms: k?.objectiveTerms ?? null,
      importKwh: k?.importKwh ?? null,
      exportKwh: k?.exportKwh ?? null,
      curtailedKwh: k?.curtailedKwh ?? null,
      unservedKwh: k?.unservedKwh ?? null,
      starts: k ? Object.values(k.units).reduce((n, u) => n + u.starts, 0) : null,
      demandChargePeaks: k ? Object.fromEntries(Object.entries(k.demandCharges).map(([charge, d]) => [charge, d.peakKw])) : {},
      solverSeconds: r.solver_seconds,
      links: { run: `/v1/runs/${r.id}` },
    };
  });
  const ranked = rows.filter((r) => r.objective !== null).sort((a, b) => b.objective! - a.objective!);
  return { studyId: study.id, changes: study.changes, rows, best: ranked[0]?.position ?? null };
}

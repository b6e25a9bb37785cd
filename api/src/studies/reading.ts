import type { RunStatus } from '@gridwright/shared/run-result';
import type { StudyStatus, StudyView } from '@gridwright/shared/studies';
import type { AppContext } from '../context';
import { Study } from '../db/entities/study';
import { pageNewestFirst, type PageQuery } from '../lib/pagination';
import { notFound } from '../lib/problem';
import { isUuid } from '../lib/uuid';
import { combinationAt } from './grid';

/** What a study's view reads of each of its runs (never the result). */
export interface StudyRunRow {
  id: string;
  study_id: string;
  study_position: number;
  name: string | null;
  status: RunStatus;
  outcome: string | null;
  windows_done: number;
  windows_total: number | null;
  started_at: Date | null;
  finished_at: Date | null;
}

const ENDED: RunStatus[] = ['succeeded', 'failed', 'cancelled'];

/** A run's share of its work: an ended run is done, a running one as far as its windows. */
function runPercent(r: StudyRunRow): number {
  if (ENDED.includes(r.status)) return 100;
  return r.windows_total ? Math.round((1000 * r.windows_done) / r.windows_total) / 10 : 0;
}

/** Every column but the base spec, which a year-long study makes large and no view shows. */
const VIEW_COLUMNS = ['id', 'tenantId', 'createdAt', 'name', 'changes', 'runsTotal', 'cancelRequestedAt'] as const;

/** A study of another tenant is "not found", like a run. */
export async function getStudyRow(ctx: AppContext, tenantId: string, id: string): Promise<Study> {
  const study = isUuid(id) ? await ctx.db.manager.findOne(Study, { where: { id, tenantId }, select: Object.fromEntries(VIEW_COLUMNS.map((c) => [c, true])) }) : null;
  if (!study) throw notFound(`Study ${id}`);
  return study;
}

async function runRowsOf(ctx: AppContext, tenantId: string, studyIds: string[]): Promise<StudyRunRow[]> {
  return ctx.db.query(
    `SELECT id, study_id, study_position, name, status, outcome, windows_done, windows_total, started_at, finished_at
       FROM runs WHERE tenant_id = $1 AND study_id = ANY($2::uuid[]) ORDER BY study_position`,
    [tenantId, studyIds],
  );
}

const count = (rows: StudyRunRow[], status: RunStatus) => rows.filter((r) => r.status === status).length;

function studyView(study: Study, rows: StudyRunRow[], withRuns: boolean): StudyView {
  const active = rows.some((r) => !ENDED.includes(r.status));
  const status: StudyStatus = active ? 'running' : study.cancelRequestedAt ? 'cancelled' : 'finished';
  const percent = rows.length ? Math.round((10 * rows.reduce((sum, r) => sum + runPercent(r), 0)) / rows.length) / 10 : 0;
  return {
    id: study.id,
    name: study.name,
    status,
    createdAt: study.createdAt.toISOString(),
    cancelRequestedAt: study.cancelRequestedAt?.toISOString() ?? null,
    changes: study.changes,
    progress: {
      runsTotal: study.runsTotal,
      runsDone: rows.filter((r) => ENDED.includes(r.status)).length,
      succeeded: count(rows, 'succeeded'),
      failed: count(rows, 'failed'),
      cancelled: count(rows, 'cancelled'),
      running: count(rows, 'running'),
      queued: count(rows, 'queued'),
      percent,
    },
    ...(withRuns
      ? {
          runs: rows.map((r) => ({
            position: r.study_position,
            values: combinationAt(study.changes, r.study_position).map((pick, i) => study.changes[i].values[pick]),
            runId: r.id,
            name: r.name,
            status: r.status,
            outcome: r.outcome,
            progress: { windowsDone: r.windows_done, windowsTotal: r.windows_total, percent: runPercent(r) },
            startedAt: r.started_at?.toISOString() ?? null,
            finishedAt: r.finished_at?.toISOString() ?? null,
          })),
        }
      : {}),
    links: { self: `/v1/studies/${study.id}`, comparison: `/v1/studies/${study.id}/comparison`, cancel: `/v1/studies/${study.id}/cancel` },
  };
}

/** A study with its progress and every combination's run. */
export async function getStudy(ctx: AppContext, tenantId: string, id: string): Promise<StudyView> {
  const study = await getStudyRow(ctx, tenantId, id);
  return studyView(study, await runRowsOf(ctx, tenantId, [study.id]), true);
}

/** The tenant's studies with their progress, newest first (keyset pagination, as runs). */
export async function listStudies(ctx: AppContext, tenantId: string, q: PageQuery): Promise<{ studies: StudyView[]; nextCursor: string | null }> {
  const qb = ctx.db.manager
    .createQueryBuilder(Study, 's')
    .select(VIEW_COLUMNS.map((c) => `s.${c}`))
    .where('s.tenant_id = :tenantId', { tenantId });
  const { items, nextCursor } = await pageNewestFirst(qb, q);
  const rows = await runRowsOf(ctx, tenantId, items.map((s) => s.id));
  return { studies: items.map((s) => studyView(s, rows.filter((r) => r.study_id === s.id), false)), nextCursor };
}

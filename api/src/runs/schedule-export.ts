import type { Schedule } from '@gridwright/shared/run-result';
import type { AppContext } from '../context';
import type { Run } from '../db/entities/run';
import { HttpProblem } from '../lib/problem';
import { getExportProfile } from '../services/export-profiles';
import { scheduleToCsv } from '../services/schedule-csv';
import { getRun } from './reading';

/** The schedule of a run that has one; 409 while it has none, saying why. */
export async function getRunSchedule(ctx: AppContext, tenantId: string, id: string): Promise<{ run: Run; schedule: Schedule }> {
  const run = await getRun(ctx, tenantId, id);
  const schedule = (run.result as { schedule?: Schedule | null } | null)?.schedule;
  if (!schedule) {
    throw new HttpProblem({
      status: 409,
      slug: 'no-schedule',
      title: 'No schedule yet',
      detail: run.result ? `Run ${run.id} ended ${run.outcome ?? run.status} without a schedule.` : `Run ${run.id} is ${run.status}; the schedule exists once it has succeeded.`,
      extensions: { runStatus: run.status, outcome: run.outcome },
    });
  }
  return { run, schedule };
}

/** What a request asks of the CSV; `delimiter` is the character itself. */
export interface ScheduleCsvChoices {
  profile?: string;
  powerUnit?: 'kW' | 'MW';
  timestamps?: 'utc' | 'offset';
  delimiter?: string;
}

/** The schedule as CSV: each choice the request makes, else the named export profile's, else kW, UTC and commas. */
export async function scheduleCsvFor(ctx: AppContext, tenantId: string, schedule: Schedule, choices: ScheduleCsvChoices): Promise<string> {
  const profile = choices.profile ? await getExportProfile(ctx, tenantId, choices.profile) : null;
  return scheduleToCsv(schedule, {
    powerUnit: choices.powerUnit ?? profile?.powerUnit ?? 'kW',
    timestamps: choices.timestamps ?? profile?.timestamps ?? 'utc',
    delimiter: choices.delimiter ?? profile?.delimiter ?? ',',
    tagMap: profile?.tagMap ?? {},
  });
}

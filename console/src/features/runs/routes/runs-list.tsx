import { useDeferredValue, useState } from 'react';
import { Link } from 'react-router-dom';
import { Button } from '@/components/button';
import { SelectField, TextField } from '@/components/field';
import { PageHeader } from '@/components/page-header';
import { ProblemAlert } from '@/components/problem-alert';
import { EmptyState, Loading } from '@/components/states';
import { usePermission } from '@/lib/session';
import { RUN_STATUSES, type RunStatus } from '@gridwright/shared/run-result';
import { useRuns } from '../api';
import { NET_VALUE_NOTE, RunsTable } from '../components/runs-table';

export function RunsListRoute() {
  const [status, setStatus] = useState<RunStatus | ''>('');
  const [name, setName] = useState('');
  const deferredName = useDeferredValue(name.trim());
  // Earlier pages' cursors, so "Newer" can step back without the API paging backwards.
  const [cursors, setCursors] = useState<(string | null)[]>([null]);
  const cursor = cursors[cursors.length - 1];
  const runs = useRuns({ status, cursor });
  // The API filters by status; the name filter narrows the loaded page.
  const shown = runs.data?.items.filter((r) => !deferredName || (r.name ?? '').toLowerCase().includes(deferredName.toLowerCase())) ?? [];
  const canCreate = usePermission('runs.create');

  const resetPaging = () => setCursors([null]);
  return (
    <div>
      <PageHeader
        title="Runs"
        subtitle="Every schedule request of this tenant, newest first. Active runs update live."
        actions={canCreate && <Link to="/workbench" className="rounded-md bg-kiln-600 px-3 py-1.5 text-sm font-medium text-white hover:bg-kiln-700">New run in the workbench</Link>}
      />
      <form className="mb-3 flex flex-wrap items-end gap-3" role="search" onSubmit={(e) => e.preventDefault()}>
        <SelectField
          label="Status"
          className="w-40"
          value={status}
          onChange={(e) => {
            setStatus(e.target.value as RunStatus | '');
            resetPaging();
          }}
        >
          <option value="">Any status</option>
          {RUN_STATUSES.map((s) => (
            <option key={s} value={s}>
              {s}
            </option>
          ))}
        </SelectField>
        <TextField
          label="Name contains (this page)"
          className="w-64"
          value={name}
          placeholder="e.g. day-ahead"
          onChange={(e) => {
            setName(e.target.value);
          }}
        />
        {runs.isFetching && !runs.isPending && <span className="pb-2 text-xs text-ash-400">refreshing…</span>}
      </form>
      {runs.isPending ? (
        <Loading label="Loading runs…" />
      ) : runs.error ? (
        <ProblemAlert error={runs.error} />
      ) : shown.length === 0 ? (
        <EmptyState title={status || deferredName ? 'No run matches these filters' : 'No runs yet'}>
          {canCreate ? 'Open the workbench, load a template and press Solve.' : 'Runs submitted by your team will appear here.'}
        </EmptyState>
      ) : (
        <>
          <RunsTable runs={shown} />
          <p className="mt-1.5 text-xs text-ash-500" data-testid="net-value-note">
            {NET_VALUE_NOTE}
          </p>
          <div className="mt-2 flex items-center justify-end gap-2">
            <Button size="sm" disabled={cursors.length <= 1} onClick={() => setCursors((c) => c.slice(0, -1))}>
              ← Newer
            </Button>
            <span className="text-xs text-ash-500">Page {cursors.length}</span>
            <Button size="sm" disabled={!runs.data.nextCursor} onClick={() => setCursors((c) => [...c, runs.data.nextCursor])}>
              Older →
            </Button>
          </div>
        </>
      )}
    </div>
  );
}

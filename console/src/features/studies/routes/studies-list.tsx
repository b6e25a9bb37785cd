import { useState } from 'react';
import { Link } from 'react-router-dom';
import { Button } from '@/components/button';
import { Table, Td, Th } from '@/components/data-table';
import { PageHeader } from '@/components/page-header';
import { ProblemAlert } from '@/components/problem-alert';
import { EmptyState, Loading } from '@/components/states';
import { formatDateTime } from '@/lib/format';
import { usePermission } from '@/lib/session';
import { useStudies } from '../api';
import { StudyProgress, StudyStatusPill } from '../components/study-progress';

export function StudiesListRoute() {
  const [cursors, setCursors] = useState<(string | null)[]>([null]);
  const studies = useStudies(cursors[cursors.length - 1]);
  const canCreate = usePermission('runs.create');
  return (
    <div>
      <PageHeader
        title="Studies"
        subtitle="One site under a grid of changes — battery sizes, tariffs, ratings — with a run per combination, compared side by side."
        actions={
          canCreate && (
            <Link to="/studies/new" className="rounded-md bg-kiln-600 px-3 py-1.5 text-sm font-medium text-white hover:bg-kiln-700">
              New study
            </Link>
          )
        }
      />
      {studies.isPending ? (
        <Loading label="Loading studies…" />
      ) : studies.error ? (
        <ProblemAlert error={studies.error} />
      ) : studies.data.items.length === 0 ? (
        <EmptyState title="No studies yet">{canCreate ? 'Start one from a demo site or a run, and vary what you want to size or compare.' : 'Studies your team starts appear here.'}</EmptyState>
      ) : (
        <>
          <Table label="Studies">
            <thead>
              <tr>
                <Th>Status</Th>
                <Th>Name</Th>
                <Th>Changes</Th>
                <Th>Progress</Th>
                <Th>Created</Th>
              </tr>
            </thead>
            <tbody>
              {studies.data.items.map((s) => (
                <tr key={s.id} className="hover:bg-ash-50">
                  <Td>
                    <StudyStatusPill status={s.status} />
                  </Td>
                  <Td className="max-w-[20rem] truncate">
                    <Link to={`/studies/${s.id}`} className="font-medium text-ash-900 hover:text-kiln-700 hover:underline">
                      {s.name ?? s.id}
                    </Link>
                  </Td>
                  <Td className="text-xs text-ash-600">{s.changes.map((c) => `${c.label} (${c.values.length})`).join(' × ')}</Td>
                  <Td>
                    <StudyProgress study={s} compact />
                  </Td>
                  <Td className="whitespace-nowrap text-xs text-ash-600">{formatDateTime(s.createdAt)}</Td>
                </tr>
              ))}
            </tbody>
          </Table>
          <div className="mt-2 flex items-center justify-end gap-2">
            <Button size="sm" disabled={cursors.length <= 1} onClick={() => setCursors((c) => c.slice(0, -1))}>
              ← Newer
            </Button>
            <span className="text-xs text-ash-500">Page {cursors.length}</span>
            <Button size="sm" disabled={!studies.data.nextCursor} onClick={() => setCursors((c) => [...c, studies.data.nextCursor])}>
              Older →
            </Button>
          </div>
        </>
      )}
    </div>
  );
}

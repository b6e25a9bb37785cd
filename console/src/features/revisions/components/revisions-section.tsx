import { useState } from 'react';
import { Link } from 'react-router-dom';
import { Panel } from '@/components/page-header';
import { ProblemAlert } from '@/components/problem-alert';
import { EmptyState, Loading } from '@/components/states';
import type { Run } from '@/lib/queries/runs';
import { usePermission } from '@/lib/session';
import { useRevisions } from '../api';
import { ReplanForm } from './replan-form';
import { RevisionChainTable } from './revision-chain';
import { RevisionDiffPanel } from './revision-diff';

/**
 * The run page's revisions: the chain of re-plans the run belongs to, what changed between it and
 * another revision, and the form that re-plans it from measured state.
 */
export function RevisionsSection({ run }: { run: Run }) {
  const chain = useRevisions(run.id);
  const canReplan = usePermission('runs.create');
  const [chosenBase, setChosenBase] = useState<string | null>(null);
  if (chain.isPending) return <Loading label="Loading the revisions…" />;
  if (chain.error) return <ProblemAlert error={chain.error} />;
  const items = chain.data.items;
  const me = items.find((i) => i.id === run.id);
  const parent = me?.parentId ? items.find((i) => i.id === me.parentId) : undefined;
  // By default a re-plan is compared with its parent, a first plan with its first re-plan.
  const baseId = chosenBase ?? parent?.id ?? items.find((i) => i.id !== run.id)?.id ?? null;
  const base = items.find((i) => i.id === baseId);
  const comparable = run.status === 'succeeded' && base?.status === 'succeeded';
  return (
    <div className="space-y-3">
      {parent && me && (
        <p className="text-sm text-ash-700" data-testid="revision-of">
          Re-plan of <Link to={`/runs/${parent.id}?view=revisions`} className="font-medium text-kiln-700 hover:underline">{parent.name ?? parent.id}</Link> from
          its step {me.fromStep}: the steps before stay as that run planned them; this run's schedule and CSV export cover the {me.steps} steps from there on.
        </p>
      )}
      <Panel title={`Chain of revisions (${items.length})`}>
        <RevisionChainTable chain={chain.data} currentId={run.id} baseId={baseId} onBase={setChosenBase} />
      </Panel>
      <Panel title="What changed">
        {!base ? (
          <EmptyState title="No other revision yet">Re-plan this run below; the re-plan and this run can then be compared step by step.</EmptyState>
        ) : comparable ? (
          <RevisionDiffPanel key={base.id} runId={run.id} baseId={base.id} />
        ) : (
          <EmptyState title="Both revisions need a schedule to be compared">The comparison appears when both have succeeded.</EmptyState>
        )}
      </Panel>
      {canReplan && run.schedule && (
        <Panel title="Re-plan from measured state">
          <ReplanForm runId={run.id} timestamps={run.schedule.timestamps} />
        </Panel>
      )}
    </div>
  );
}

import { RevisionsSection } from '@/features/revisions/components/revisions-section';
import { RunDetailRoute, type RunPageSection } from '@/features/runs/routes/run-detail';

/** The sections other features add to the run page: the app composes them, as features never import each other. */
const sections: RunPageSection[] = [{ id: 'revisions', label: 'Revisions and re-plan', render: (run) => <RevisionsSection run={run} /> }];

export function RunPage() {
  return <RunDetailRoute sections={sections} />;
}

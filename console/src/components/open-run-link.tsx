import { Link } from 'react-router-dom';

/** The small "Open run" link of a table row that stands for one run (a study's combinations, its progress). */
export function OpenRunLink({ runId }: { runId: string }) {
  return (
    <Link to={`/runs/${runId}`} className="text-xs text-kiln-700 hover:underline">
      Open run
    </Link>
  );
}

import { isProblem } from '@/lib/api-problem';

/** Shows an API problem's title, detail and field errors; any other error by its message. */
export function ProblemAlert({ error, className = '' }: { error: unknown; className?: string }) {
  if (!error) return null;
  const problem = isProblem(error) ? error : null;
  const title = problem ? problem.title : 'Something went wrong';
  const detail = problem ? problem.detail : error instanceof Error ? error.message : String(error);
  return (
    <div role="alert" className={`rounded-md border border-red-200 bg-red-50 px-3 py-2 text-sm text-red-900 ${className}`}>
      <p className="font-medium">
        {title}
        {problem && <span className="ml-2 font-mono text-xs text-red-700">{problem.status}</span>}
      </p>
      {detail && <p className="mt-0.5 text-red-800">{detail}</p>}
      {problem && problem.errors.length > 0 && (
        <ul className="mt-1 list-disc pl-5 text-xs">
          {problem.errors.map((e) => (
            <li key={`${e.pointer}:${e.message}`}>
              <code className="font-mono">{e.pointer || '/'}</code> {e.message}
            </li>
          ))}
        </ul>
      )}
    </div>
  );
}

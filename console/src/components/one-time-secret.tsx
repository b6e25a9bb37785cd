import type { ReactNode } from 'react';
import { Button } from '@/components/button';
import { CopyButton } from '@/components/copy-button';

/** A secret the API shows only in the answer that made it: displayed with a copy button until dismissed. */
export function OneTimeSecret({
  title,
  detail,
  secret,
  onDone,
  testId,
}: {
  title: ReactNode;
  detail: ReactNode;
  secret: string;
  onDone: () => void;
  testId: string;
}) {
  return (
    <div role="status" className="rounded-lg border-2 border-kiln-400 bg-kiln-50 p-3" data-testid={testId}>
      <p className="text-sm font-semibold text-ash-900">{title}</p>
      <p className="mt-0.5 text-xs text-ash-700">{detail}</p>
      <div className="mt-2 flex items-center gap-2">
        <code className="min-w-0 flex-1 break-all rounded bg-white px-2 py-1 font-mono text-xs ring-1 ring-kiln-200" data-testid={`${testId}-secret`}>
          {secret}
        </code>
        <CopyButton text={secret} />
      </div>
      <Button size="sm" variant="ghost" className="mt-2" onClick={onDone}>
        I have stored it
      </Button>
    </div>
  );
}

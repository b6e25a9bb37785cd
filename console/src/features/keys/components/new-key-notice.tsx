import { Button } from '@/components/button';
import { CopyButton } from '@/components/copy-button';

/** The one moment the whole key exists outside the caller's vault: the API keeps only a hash. */
export function NewKeyNotice({ secret, name, onDone }: { secret: string; name: string; onDone: () => void }) {
  return (
    <div role="status" className="rounded-lg border-2 border-kiln-400 bg-kiln-50 p-3" data-testid="new-key">
      <p className="text-sm font-semibold text-ash-900">Key “{name}” created — copy it now</p>
      <p className="mt-0.5 text-xs text-ash-700">This is the only time it is shown. Gridwright stores a hash and cannot show it again.</p>
      <div className="mt-2 flex items-center gap-2">
        <code className="min-w-0 flex-1 break-all rounded bg-white px-2 py-1 font-mono text-xs ring-1 ring-kiln-200" data-testid="new-key-secret">
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

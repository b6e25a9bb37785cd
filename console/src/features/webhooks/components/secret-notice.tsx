import { Button } from '@/components/button';
import { CopyButton } from '@/components/copy-button';

/** A signing secret exists in the clear only in the answer that made it. */
export function SecretNotice({ secret, url, onDone }: { secret: string; url: string; onDone: () => void }) {
  return (
    <div role="status" className="rounded-lg border-2 border-kiln-400 bg-kiln-50 p-3" data-testid="webhook-secret">
      <p className="text-sm font-semibold">Signing secret for {url}</p>
      <p className="mt-0.5 text-xs text-ash-700">Shown once. Verify each delivery's <code className="font-mono">webhook-signature</code> with it (Standard Webhooks).</p>
      <div className="mt-2 flex items-center gap-2">
        <code className="min-w-0 flex-1 break-all rounded bg-white px-2 py-1 font-mono text-xs ring-1 ring-kiln-200">{secret}</code>
        <CopyButton text={secret} />
      </div>
      <Button size="sm" variant="ghost" className="mt-2" onClick={onDone}>
        I have stored it
      </Button>
    </div>
  );
}

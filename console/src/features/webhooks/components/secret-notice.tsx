import { OneTimeSecret } from '@/components/one-time-secret';

/** A signing secret exists in the clear only in the answer that made it. */
export function SecretNotice({ secret, url, onDone }: { secret: string; url: string; onDone: () => void }) {
  return (
    <OneTimeSecret
      testId="webhook-secret"
      title={`Signing secret for ${url}`}
      detail={
        <>
          Shown once. Verify each delivery's <code className="font-mono">webhook-signature</code> with it (Standard Webhooks).
        </>
      }
      secret={secret}
      onDone={onDone}
    />
  );
}

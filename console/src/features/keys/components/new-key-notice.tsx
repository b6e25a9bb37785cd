import { OneTimeSecret } from '@/components/one-time-secret';

/** The one moment the whole key exists outside the caller's vault: the API keeps only a hash. */
export function NewKeyNotice({ secret, name, onDone }: { secret: string; name: string; onDone: () => void }) {
  return (
    <OneTimeSecret
      testId="new-key"
      title={`Key “${name}” created — copy it now`}
      detail="This is the only time it is shown. Gridwright stores a hash and cannot show it again."
      secret={secret}
      onDone={onDone}
    />
  );
}

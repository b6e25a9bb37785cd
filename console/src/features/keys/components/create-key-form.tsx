import { useState, type FormEvent } from 'react';
import { Button } from '@/components/button';
import { CheckboxField, TextField } from '@/components/field';
import { ProblemAlert } from '@/components/problem-alert';
import { allScopes, useCreateApiKey, type Scope } from '../api';
import { NewKeyNotice } from './new-key-notice';

export function CreateKeyForm() {
  const [name, setName] = useState('');
  const [scopes, setScopes] = useState<Scope[]>(['runs:read', 'runs:write']);
  const [expires, setExpires] = useState('');
  const create = useCreateApiKey();

  const submit = (e: FormEvent) => {
    e.preventDefault();
    create.mutate(
      { name: name.trim(), scopes, expiresAt: expires ? new Date(`${expires}T23:59:59Z`).toISOString() : null },
      { onSuccess: () => setName('') },
    );
  };
  const toggle = (s: Scope) => setScopes((cur) => (cur.includes(s) ? cur.filter((x) => x !== s) : [...cur, s]));

  return (
    <div className="space-y-3">
      {create.data && <NewKeyNotice secret={create.data.key} name={create.data.apiKey.name} onDone={() => create.reset()} />}
      <form onSubmit={submit} className="space-y-3" aria-label="Create an API key">
        <TextField label="Name" required maxLength={100} value={name} onChange={(e) => setName(e.target.value)} placeholder="e.g. scada-bridge" />
        <fieldset>
          <legend className="mb-1 text-xs font-medium text-ash-700">Scopes</legend>
          <div className="grid grid-cols-2 gap-1">
            {allScopes.map((s) => (
              <CheckboxField key={s} label={s} checked={scopes.includes(s)} onChange={() => toggle(s)} />
            ))}
          </div>
        </fieldset>
        <TextField label="Expires on (optional)" type="date" value={expires} onChange={(e) => setExpires(e.target.value)} hint="Leave empty for a key that lasts until revoked." />
        <ProblemAlert error={create.error} />
        <Button type="submit" variant="primary" disabled={create.isPending || !name.trim() || scopes.length === 0}>
          Create key
        </Button>
      </form>
    </div>
  );
}

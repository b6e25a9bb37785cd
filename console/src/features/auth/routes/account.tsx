import { useState, type FormEvent } from 'react';
import { Button } from '@/components/button';
import { TextField } from '@/components/field';
import { PageHeader, Panel } from '@/components/page-header';
import { ProblemAlert } from '@/components/problem-alert';
import { useSession } from '@/lib/session';
import { useChangePassword } from '../api';

export function AccountRoute() {
  const { data: session } = useSession();
  const [currentPassword, setCurrent] = useState('');
  const [newPassword, setNew] = useState('');
  const change = useChangePassword();
  const submit = (e: FormEvent) => {
    e.preventDefault();
    change.mutate({ currentPassword, newPassword }, { onSuccess: () => { setCurrent(''); setNew(''); } });
  };
  return (
    <div className="max-w-xl">
      <PageHeader title="Your account" subtitle={session ? `${session.user.email} · ${session.role}` : undefined} />
      <Panel title="Change password">
        <form onSubmit={submit} className="space-y-3">
          <TextField label="Current password" type="password" autoComplete="current-password" required value={currentPassword} onChange={(e) => setCurrent(e.target.value)} />
          <TextField label="New password" type="password" autoComplete="new-password" minLength={10} required value={newPassword} onChange={(e) => setNew(e.target.value)} hint="At least 10 characters. Your other sessions end." />
          <ProblemAlert error={change.error} />
          {change.isSuccess && <p role="status" className="text-sm text-ash-700">Password changed.</p>}
          <Button type="submit" variant="primary" disabled={change.isPending}>Change password</Button>
        </form>
      </Panel>
    </div>
  );
}

import { useState, type FormEvent } from 'react';
import { Navigate, useSearchParams } from 'react-router-dom';
import { Button } from '@/components/button';
import { TextField } from '@/components/field';
import { ProblemAlert } from '@/components/problem-alert';
import { useAcceptInvitation } from '../api';
import { AuthCard } from '../components/auth-card';

export function AcceptInvitationRoute() {
  const [params] = useSearchParams();
  const token = params.get('token') ?? '';
  const [name, setName] = useState('');
  const [password, setPassword] = useState('');
  const accept = useAcceptInvitation();
  if (accept.isSuccess) return <Navigate to="/" replace />;
  const submit = (e: FormEvent) => {
    e.preventDefault();
    accept.mutate({ token, name, password });
  };
  return (
    <AuthCard title="Join your team on Gridwright">
      {!token ? (
        <p role="alert" className="text-sm text-red-800">This link has no invitation token. Open the link from the e-mail again.</p>
      ) : (
        <form onSubmit={submit} className="space-y-3">
          <TextField label="Your name" required value={name} onChange={(e) => setName(e.target.value)} autoFocus />
          <TextField label="Password" type="password" autoComplete="new-password" minLength={10} required value={password} onChange={(e) => setPassword(e.target.value)} hint="At least 10 characters." />
          <ProblemAlert error={accept.error} />
          <Button type="submit" variant="primary" className="w-full" disabled={accept.isPending}>
            Accept invitation
          </Button>
        </form>
      )}
    </AuthCard>
  );
}

import { useState, type FormEvent } from 'react';
import { Link, useSearchParams } from 'react-router-dom';
import { Button } from '@/components/button';
import { TextField } from '@/components/field';
import { ProblemAlert } from '@/components/problem-alert';
import { useCompletePasswordReset } from '../api';
import { AuthCard } from '../components/auth-card';

export function ResetPasswordRoute() {
  const [params] = useSearchParams();
  const token = params.get('token') ?? '';
  const [password, setPassword] = useState('');
  const [repeat, setRepeat] = useState('');
  const complete = useCompletePasswordReset();
  const mismatch = repeat.length > 0 && repeat !== password;
  const submit = (e: FormEvent) => {
    e.preventDefault();
    if (!mismatch) complete.mutate({ token, password });
  };
  return (
    <AuthCard title="Choose a new password" footer={<Link to="/sign-in" className="underline">Back to sign-in</Link>}>
      {!token ? (
        <p role="alert" className="text-sm text-red-800">This link has no reset token. Open the link from the e-mail again.</p>
      ) : complete.isSuccess ? (
        <p role="status" className="text-sm text-ash-700">
          Password changed. <Link to="/sign-in" className="font-medium text-kiln-700 underline">Sign in</Link> with it now.
        </p>
      ) : (
        <form onSubmit={submit} className="space-y-3">
          <TextField label="New password" type="password" autoComplete="new-password" minLength={10} required value={password} onChange={(e) => setPassword(e.target.value)} hint="At least 10 characters." />
          <TextField label="Repeat it" type="password" autoComplete="new-password" required value={repeat} onChange={(e) => setRepeat(e.target.value)} error={mismatch ? 'The two passwords differ.' : undefined} />
          <ProblemAlert error={complete.error} />
          <Button type="submit" variant="primary" className="w-full" disabled={complete.isPending || mismatch}>
            Change password
          </Button>
        </form>
      )}
    </AuthCard>
  );
}

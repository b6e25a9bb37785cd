import { useState, type FormEvent } from 'react';
import { Link } from 'react-router-dom';
import { Button } from '@/components/button';
import { TextField } from '@/components/field';
import { ProblemAlert } from '@/components/problem-alert';
import { useRequestPasswordReset } from '../api';
import { AuthCard } from '../components/auth-card';

export function ForgotPasswordRoute() {
  const [email, setEmail] = useState('');
  const request = useRequestPasswordReset();
  const submit = (e: FormEvent) => {
    e.preventDefault();
    request.mutate({ email });
  };
  return (
    <AuthCard title="Reset your password" footer={<Link to="/sign-in" className="underline">Back to sign-in</Link>}>
      {request.isSuccess ? (
        <p role="status" className="text-sm text-ash-700">
          If an account exists for <strong>{email}</strong>, an e-mail with a reset link is on its way. The link works once.
        </p>
      ) : (
        <form onSubmit={submit} className="space-y-3">
          <TextField label="E-mail" type="email" required value={email} onChange={(e) => setEmail(e.target.value)} autoFocus />
          <ProblemAlert error={request.error} />
          <Button type="submit" variant="primary" className="w-full" disabled={request.isPending}>
            Send reset link
          </Button>
        </form>
      )}
    </AuthCard>
  );
}

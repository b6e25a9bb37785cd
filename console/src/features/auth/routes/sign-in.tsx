import { useState, type FormEvent } from 'react';
import { Link, Navigate, useLocation } from 'react-router-dom';
import { Button } from '@/components/button';
import { TextField } from '@/components/field';
import { ProblemAlert } from '@/components/problem-alert';
import { pathAfterSignIn } from '@/lib/return-to';
import { useSession } from '@/lib/session';
import { useSignIn } from '../api';
import { AuthCard } from '../components/auth-card';

export function SignInRoute() {
  const [email, setEmail] = useState('');
  const [password, setPassword] = useState('');
  const signIn = useSignIn();
  const { data: session } = useSession();
  const location = useLocation();

  if (session) return <Navigate to={pathAfterSignIn(location.state, session)} replace />;

  const submit = (e: FormEvent) => {
    e.preventDefault();
    signIn.mutate({ email, password });
  };
  return (
    <AuthCard title="Sign in" footer={<Link to="/forgot-password" className="underline hover:text-ash-800">Forgot your password?</Link>}>
      <form onSubmit={submit} className="space-y-3">
        <TextField label="E-mail" type="email" autoComplete="username" required value={email} onChange={(e) => setEmail(e.target.value)} autoFocus />
        <TextField label="Password" type="password" autoComplete="current-password" required value={password} onChange={(e) => setPassword(e.target.value)} />
        <ProblemAlert error={signIn.error} />
        <Button type="submit" variant="primary" className="w-full" disabled={signIn.isPending}>
          {signIn.isPending ? 'Signing in…' : 'Sign in'}
        </Button>
      </form>
    </AuthCard>
  );
}

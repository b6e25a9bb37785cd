import { useState, type FormEvent } from 'react';
import { Button } from '@/components/button';
import { SelectField, TextField } from '@/components/field';
import { ProblemAlert } from '@/components/problem-alert';
import { tenantRoles, useInviteMember, type TenantRole } from '../api';

export function InviteForm() {
  const [email, setEmail] = useState('');
  const [role, setRole] = useState<TenantRole>('developer');
  const invite = useInviteMember();
  const submit = (e: FormEvent) => {
    e.preventDefault();
    invite.mutate({ email: email.trim(), role }, { onSuccess: () => setEmail('') });
  };
  return (
    <form onSubmit={submit} className="space-y-3" aria-label="Invite a member">
      <TextField label="E-mail" type="email" required value={email} onChange={(e) => setEmail(e.target.value)} />
      <SelectField label="Role" value={role} onChange={(e) => setRole(e.target.value as TenantRole)}>
        {tenantRoles.map((r) => (
          <option key={r} value={r}>
            {r}
          </option>
        ))}
      </SelectField>
      <ProblemAlert error={invite.error} />
      {invite.isSuccess && <p role="status" className="text-xs text-ash-600">Invitation sent to {invite.data.email}; it expires {new Date(invite.data.expiresAt).toLocaleString('en-GB')}.</p>}
      <Button type="submit" variant="primary" disabled={invite.isPending}>
        Send invitation
      </Button>
    </form>
  );
}

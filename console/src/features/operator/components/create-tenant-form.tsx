import { useState, type FormEvent } from 'react';
import { Link } from 'react-router-dom';
import { Button } from '@/components/button';
import { SelectField, TextField } from '@/components/field';
import { ProblemAlert } from '@/components/problem-alert';
import { usePlans } from '@/lib/queries/plans';
import { useCreateTenant } from '../api';

export function CreateTenantForm() {
  const [slug, setSlug] = useState('');
  const [name, setName] = useState('');
  const [planId, setPlanId] = useState('');
  const [ownerEmail, setOwnerEmail] = useState('');
  const plans = usePlans();
  const create = useCreateTenant();
  const submit = (e: FormEvent) => {
    e.preventDefault();
    create.mutate(
      { slug: slug.trim(), name: name.trim() || undefined, planId: planId || undefined, ownerEmail: ownerEmail.trim() || undefined },
      {
        onSuccess: () => {
          setSlug('');
          setName('');
          setOwnerEmail('');
        },
      },
    );
  };
  return (
    <form onSubmit={submit} className="space-y-3" aria-label="Create a tenant">
      <TextField label="Slug" required pattern="[a-z0-9][a-z0-9\-]{1,48}[a-z0-9]" value={slug} onChange={(e) => setSlug(e.target.value)} hint="Lower-case letters, digits and dashes; 3–50 characters." />
      <TextField label="Name" value={name} onChange={(e) => setName(e.target.value)} />
      <SelectField label="Plan" value={planId} onChange={(e) => setPlanId(e.target.value)}>
        <option value="">Default plan</option>
        {plans.data?.items.map((p) => (
          <option key={p.id} value={p.id}>
            {p.name}
          </option>
        ))}
      </SelectField>
      <TextField label="First owner's e-mail" type="email" value={ownerEmail} onChange={(e) => setOwnerEmail(e.target.value)} hint="They get an invitation e-mail (see the outbox)." />
      <ProblemAlert error={create.error} />
      {create.data && (
        <p role="status" className="text-xs text-ash-700">
          Created <Link className="font-medium text-kiln-700 underline" to={`/operator/tenants/${create.data.id}`}>{create.data.name}</Link>.
        </p>
      )}
      <Button type="submit" variant="primary" disabled={create.isPending}>
        Create tenant
      </Button>
    </form>
  );
}

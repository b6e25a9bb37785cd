import { useState, type FormEvent } from 'react';
import { Button } from '@/components/button';
import { TextField } from '@/components/field';
import { ProblemAlert } from '@/components/problem-alert';
import { useUpdateTenant, type LimitOverrides, type Limits, type Tenant } from '../api';

const fields: { key: keyof Limits; label: string }[] = [
  { key: 'monthlyRuns', label: 'Runs per month' },
  { key: 'monthlySolverSeconds', label: 'Solver-seconds per month' },
  { key: 'maxSteps', label: 'Steps per run' },
  { key: 'maxUnits', label: 'Units per run' },
  { key: 'requestsPerSecond', label: 'Requests per second' },
  { key: 'concurrentRuns', label: 'Concurrent runs' },
  { key: 'webhookEndpoints', label: 'Webhook endpoints' },
];

/** One field per limit; an empty field removes the override, so the plan's value applies again. */
export function LimitOverridesForm({ tenant }: { tenant: Tenant }) {
  const current = tenant.limitOverrides as LimitOverrides;
  const [values, setValues] = useState<Record<string, string>>(() =>
    Object.fromEntries(fields.map((f) => [f.key, current[f.key] == null ? '' : String(current[f.key])])),
  );
  const update = useUpdateTenant(tenant.id);
  const submit = (e: FormEvent) => {
    e.preventDefault();
    const limitOverrides: LimitOverrides = {};
    for (const f of fields) limitOverrides[f.key] = values[f.key] === '' ? null : Number(values[f.key]);
    update.mutate({ limitOverrides });
  };
  return (
    <form onSubmit={submit} className="space-y-2" aria-label="Limit overrides">
      <div className="grid grid-cols-2 gap-2">
        {fields.map((f) => (
          <TextField
            key={f.key}
            label={f.label}
            type="number"
            min={0}
            value={values[f.key]}
            placeholder={`plan: ${tenant.limits[f.key]}`}
            onChange={(e) => setValues((v) => ({ ...v, [f.key]: e.target.value }))}
          />
        ))}
      </div>
      <ProblemAlert error={update.error} />
      {update.isSuccess && <p role="status" className="text-xs text-ash-600">Overrides saved.</p>}
      <Button type="submit" size="sm" disabled={update.isPending}>
        Save overrides
      </Button>
    </form>
  );
}

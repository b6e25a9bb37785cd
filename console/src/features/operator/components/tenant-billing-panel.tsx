import { useState } from 'react';
import { Button } from '@/components/button';
import { SelectField, TextField } from '@/components/field';
import { ProblemAlert } from '@/components/problem-alert';
import { Loading } from '@/components/states';
import { formatDateTime } from '@/lib/format';
import { usePlans } from '@/lib/queries/plans';
import { useEndPlanGrant, useGrantPlan, useTenantBilling } from '../api';

const sourceText = { subscription: 'pays through a subscription', grant: 'granted by an operator', free: 'on the free plan', assigned: 'set by an operator, unpaid' } as const;

/** A tenant's billing standing as Gridwright records it, and granting a plan without payment (audited). */
export function TenantBillingPanel({ tenantId }: { tenantId: string }) {
  const billing = useTenantBilling(tenantId);
  const plans = usePlans();
  const grant = useGrantPlan(tenantId);
  const endGrant = useEndPlanGrant(tenantId);
  const [planId, setPlanId] = useState('');
  const [reason, setReason] = useState('');
  if (billing.isPending) return <Loading />;
  if (billing.error) return <ProblemAlert error={billing.error} />;
  const b = billing.data;
  const s = b.subscription;
  return (
    <div className="space-y-2 text-[13px]" data-testid="tenant-billing">
      <dl className="grid grid-cols-[auto_1fr] gap-x-3 gap-y-1">
        <dt className="text-ash-500">Billing</dt>
        <dd>{b.enabled ? 'on' : 'off (plans set by operators)'}</dd>
        <dt className="text-ash-500">Plan</dt>
        <dd>
          {b.planId} — {sourceText[b.planSource]}
        </dd>
        {b.customerId && (
          <>
            <dt className="text-ash-500">Customer</dt>
            <dd className="font-mono text-xs">{b.customerId}</dd>
          </>
        )}
        {s && (
          <>
            <dt className="text-ash-500">Subscription</dt>
            <dd>
              {s.planId}, {s.status === 'past_due' ? 'payment overdue' : s.status}, period ends {formatDateTime(s.currentPeriodEnd)}
              {s.scheduledPlanId && ` → ${s.scheduledPlanId} then`}
            </dd>
          </>
        )}
        {b.graceEndsAt && (
          <>
            <dt className="text-ash-500">Grace until</dt>
            <dd className="font-medium text-red-800">{formatDateTime(b.graceEndsAt)}</dd>
          </>
        )}
      </dl>
      {b.grant ? (
        <div className="space-y-1 rounded-md border border-ash-200 bg-ash-50 p-2">
          <p>
            Granted <strong>{b.grant.planId}</strong> {formatDateTime(b.grant.grantedAt)}
            {b.grant.grantedBy ? ` by ${b.grant.grantedBy}` : ''}: {b.grant.reason}
          </p>
          <Button size="sm" variant="danger" disabled={endGrant.isPending} onClick={() => endGrant.mutate()}>
            End the grant
          </Button>
        </div>
      ) : (
        <form
          className="space-y-2"
          onSubmit={(e) => {
            e.preventDefault();
            if (planId && reason.trim()) grant.mutate({ planId, reason: reason.trim() });
          }}
        >
          <SelectField label="Grant a plan without payment" value={planId} onChange={(e) => setPlanId(e.target.value)}>
            <option value="">Choose a plan</option>
            {plans.data?.items.map((p) => (
              <option key={p.id} value={p.id}>
                {p.name}
              </option>
            ))}
          </SelectField>
          <TextField label="Reason (audited)" value={reason} maxLength={500} onChange={(e) => setReason(e.target.value)} />
          <Button type="submit" size="sm" disabled={grant.isPending || !planId || !reason.trim()}>
            Grant plan
          </Button>
        </form>
      )}
      <ProblemAlert error={grant.error ?? endGrant.error} />
    </div>
  );
}

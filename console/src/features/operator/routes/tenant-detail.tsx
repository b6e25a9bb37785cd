import { useState } from 'react';
import { Link, useParams } from 'react-router-dom';
import { Button } from '@/components/button';
import { SelectField, TextField } from '@/components/field';
import { PageHeader, Panel } from '@/components/page-header';
import { ProblemAlert } from '@/components/problem-alert';
import { Loading } from '@/components/states';
import { LimitsList, UsageCharts } from '@/components/usage-charts';
import { formatDateTime } from '@/lib/format';
import { usePlans } from '@/lib/queries/plans';
import { useResumeTenant, useSuspendTenant, useTenant, useTenantUsage, useUpdateTenant } from '../api';
import { LimitOverridesForm } from '../components/limit-overrides-form';
import { TenantBillingPanel } from '../components/tenant-billing-panel';

export function TenantDetailRoute() {
  const { tenantId = '' } = useParams();
  const tenant = useTenant(tenantId);
  const usage = useTenantUsage(tenantId);
  const plans = usePlans();
  const update = useUpdateTenant(tenantId);
  const suspend = useSuspendTenant(tenantId);
  const resume = useResumeTenant(tenantId);
  const [reason, setReason] = useState('');

  if (tenant.isPending) return <Loading />;
  if (tenant.error) return <ProblemAlert error={tenant.error} />;
  const t = tenant.data;
  return (
    <div>
      <PageHeader
        title={t.name}
        subtitle={
          <span>
            <Link to="/operator/tenants" className="hover:underline">Tenants</Link> / <code className="font-mono text-xs">{t.slug}</code> · created {formatDateTime(t.createdAt)}
          </span>
        }
      />
      <div className="grid gap-3 lg:grid-cols-3">
        <Panel title="Plan and limits">
          <SelectField label="Plan" value={t.planId} disabled={update.isPending} onChange={(e) => update.mutate({ planId: e.target.value })}>
            {plans.data?.items.map((p) => (
              <option key={p.id} value={p.id}>
                {p.name}
              </option>
            ))}
          </SelectField>
          <ProblemAlert error={update.error} className="mt-2" />
          <div className="mt-3">
            <LimitsList limits={t.limits} overrides={t.limitOverrides} />
          </div>
        </Panel>
        <Panel title="Billing">
          <TenantBillingPanel tenantId={tenantId} />
        </Panel>
        <Panel title="Limit overrides">
          <LimitOverridesForm key={JSON.stringify(t.limitOverrides)} tenant={t} />
        </Panel>
        <Panel title="Access">
          {t.suspended ? (
            <div className="space-y-2">
              <p className="text-sm font-medium text-red-800">Suspended {formatDateTime(t.suspendedAt)}</p>
              {t.suspendedReason && <p className="text-sm text-ash-600">Reason: {t.suspendedReason}</p>}
              <Button variant="primary" onClick={() => resume.mutate()} disabled={resume.isPending}>
                Resume tenant
              </Button>
            </div>
          ) : (
            <form
              className="space-y-2"
              onSubmit={(e) => {
                e.preventDefault();
                suspend.mutate(reason.trim());
              }}
            >
              <p className="text-sm text-ash-600">Suspending refuses every key and session of this tenant (403) until it is resumed. Runs already accepted are kept.</p>
              <TextField label="Reason (shown to the tenant)" value={reason} onChange={(e) => setReason(e.target.value)} />
              <Button type="submit" variant="danger" disabled={suspend.isPending}>
                Suspend tenant
              </Button>
            </form>
          )}
          <ProblemAlert error={suspend.error ?? resume.error} className="mt-2" />
        </Panel>
      </div>
      <h2 className="mb-2 mt-5 text-sm font-semibold">Usage this month</h2>
      {usage.isPending ? <Loading /> : usage.error ? <ProblemAlert error={usage.error} /> : <UsageCharts usage={usage.data} />}
    </div>
  );
}

import { PageHeader, Panel } from '@/components/page-header';
import { ProblemAlert } from '@/components/problem-alert';
import { Loading } from '@/components/states';
import { LimitsList, UsageCharts } from '@/components/usage-charts';
import { formatDateTime } from '@/lib/format';
import { usePlans } from '@/lib/queries/plans';
import { useTenant, useUsage } from '../api';

export function UsageRoute() {
  const usage = useUsage();
  const tenant = useTenant();
  const plans = usePlans();
  const plan = plans.data?.items.find((p) => p.id === (tenant.data?.planId ?? usage.data?.planId));
  return (
    <div>
      <PageHeader
        title="Usage"
        subtitle={usage.data ? `Period ${usage.data.period.key} (${formatDateTime(usage.data.period.start)} – ${formatDateTime(usage.data.period.end)}, UTC month). Runs count when submitted, solver-seconds when a run ends.` : undefined}
      />
      {usage.isPending ? <Loading /> : usage.error ? <ProblemAlert error={usage.error} /> : <UsageCharts usage={usage.data} />}
      <div className="mt-4 grid gap-3 lg:grid-cols-2">
        <Panel title={plan ? `Plan: ${plan.name}` : 'Plan'}>
          {plan && <p className="mb-2 text-sm text-ash-600">{plan.description}</p>}
          {tenant.data ? <LimitsList limits={tenant.data.limits} overrides={tenant.data.limitOverrides} /> : usage.data && <LimitsList limits={usage.data.limits} />}
          <ProblemAlert error={tenant.error} />
        </Panel>
        <Panel title="Plans on offer">
          {plans.isPending ? (
            <Loading />
          ) : plans.error ? (
            <ProblemAlert error={plans.error} />
          ) : (
            <ul className="divide-y divide-ash-100 text-[13px]">
              {plans.data.items.map((p) => (
                <li key={p.id} className="py-1.5">
                  <span className="font-medium">{p.name}</span>
                  {p.id === plan?.id && <span className="ml-2 rounded bg-ash-900 px-1.5 text-[10px] text-white">current</span>}
                  <span className="ml-2 font-mono text-xs text-ash-500">
                    {p.limits.monthlyRuns} runs · {p.limits.maxSteps} steps · {p.limits.maxUnits} units · {p.limits.webhookEndpoints} webhook endpoints
                  </span>
                  <p className="text-xs text-ash-500">{p.description}</p>
                </li>
              ))}
            </ul>
          )}
        </Panel>
      </div>
    </div>
  );
}

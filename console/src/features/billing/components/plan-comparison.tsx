import { Button } from '@/components/button';
import { Table, Td, Th } from '@/components/data-table';
import { ProblemAlert } from '@/components/problem-alert';
import { limitLabels } from '@/components/usage-charts';
import type { Schemas } from '@/lib/api-client';
import { formatNumber } from '@/lib/format';
import { useChangePlan, useStartCheckout, type BillingOverview } from '../api';
import { formatMoney } from './money';

type Plan = Schemas['Plan'];

/** The plans side by side — price and every limit — with the action that gets each from where the tenant stands. */
export function PlanComparison({ plans, billing, canManage }: { plans: Plan[]; billing: BillingOverview; canManage: boolean }) {
  const checkout = useStartCheckout();
  const change = useChangePlan();
  const priceOf = (id: string) => billing.prices.find((p) => p.planId === id);
  const subscribed = billing.subscription !== null;
  const busy = checkout.isPending || change.isPending;

  function action(plan: Plan) {
    if (!billing.enabled || !canManage || billing.grant) return null;
    if (plan.id === billing.planId && !billing.subscription?.scheduledPlanId) return <span className="text-xs text-ash-500">Current plan</span>;
    const price = priceOf(plan.id);
    if (plan.id === billing.freePlanId) {
      return subscribed ? (
        <Button size="sm" disabled={busy || billing.subscription?.scheduledPlanId === plan.id} onClick={() => change.mutate(plan.id)}>
          Move to {plan.name} at period end
        </Button>
      ) : null;
    }
    if (!price) return <span className="text-xs text-ash-500">Not for sale</span>;
    if (!subscribed) {
      return (
        <Button size="sm" variant="primary" disabled={busy} onClick={() => checkout.mutate(plan.id)}>
          Subscribe to {plan.name}
        </Button>
      );
    }
    return (
      <Button size="sm" disabled={busy} onClick={() => change.mutate(plan.id)}>
        Switch to {plan.name}
      </Button>
    );
  }

  return (
    <div>
      <Table label="Plan comparison">
        <thead>
          <tr>
            <Th />
            {plans.map((p) => (
              <Th key={p.id} className={p.id === billing.planId ? 'text-kiln-700' : ''}>
                {p.name}
              </Th>
            ))}
          </tr>
        </thead>
        <tbody>
          <tr>
            <Td className="text-ash-600">Price</Td>
            {plans.map((p) => {
              const price = priceOf(p.id);
              return (
                <Td key={p.id} className="font-mono">
                  {price ? `${formatMoney(price.amount, price.currency)} / ${price.interval}` : p.id === billing.freePlanId ? 'Free' : '—'}
                </Td>
              );
            })}
          </tr>
          {(Object.keys(limitLabels) as (keyof Plan['limits'])[]).map((k) => (
            <tr key={k}>
              <Td className="text-ash-600">{limitLabels[k]}</Td>
              {plans.map((p) => (
                <Td key={p.id} className="font-mono">
                  {formatNumber(p.limits[k], 0)}
                </Td>
              ))}
            </tr>
          ))}
          <tr>
            <Td />
            {plans.map((p) => (
              <Td key={p.id}>{action(p)}</Td>
            ))}
          </tr>
        </tbody>
      </Table>
      {billing.usagePrice && (
        <p className="mt-2 text-xs text-ash-500">
          On a paid plan, solver-seconds above the monthly allowance are not refused: they are billed at {formatMoney(billing.usagePrice.amount, billing.usagePrice.currency)} per started{' '}
          {billing.usagePrice.perSolverSeconds === 60 ? 'solver-minute' : `${billing.usagePrice.perSolverSeconds} solver-seconds`}. A higher plan takes effect at once (the rest of the
          period is charged now); a lower one at the end of the period.
        </p>
      )}
      <ProblemAlert error={checkout.error ?? change.error} className="mt-2" />
    </div>
  );
}

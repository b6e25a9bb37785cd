import { Button } from '@/components/button';
import { ConfirmButton } from '@/components/confirm-button';
import { ProblemAlert } from '@/components/problem-alert';
import { useCancelSubscription, useResumeSubscription, type BillingOverview } from '../api';
import { formatDay } from './money';

const sourceText: Record<BillingOverview['planSource'], string> = {
  subscription: 'Paid through a monthly subscription.',
  grant: 'Granted by an operator, without payment.',
  free: 'The free plan.',
  assigned: 'Set by an operator; no subscription pays for it.',
};

/** Where the plan comes from, what happens at the end of the period, and cancelling or taking a cancellation back. */
export function PlanStanding({ billing, planName, canManage }: { billing: BillingOverview; planName: (id: string) => string; canManage: boolean }) {
  const cancel = useCancelSubscription();
  const resume = useResumeSubscription();
  const s = billing.subscription;
  return (
    <div className="space-y-2 text-sm" data-testid="plan-standing">
      <p>
        <span className="text-base font-semibold">{planName(billing.planId)}</span> <span className="text-ash-600">— {sourceText[billing.planSource]}</span>
      </p>
      {billing.grant && (
        <p className="text-ash-600">
          Reason: {billing.grant.reason} (since {formatDay(billing.grant.grantedAt)}
          {billing.grant.grantedBy ? `, by ${billing.grant.grantedBy}` : ''})
        </p>
      )}
      {s && (
        <dl className="grid grid-cols-[auto_1fr] gap-x-4 gap-y-1 text-[13px]">
          <dt className="text-ash-500">Status</dt>
          <dd>{s.status === 'past_due' ? 'Payment overdue' : s.status}</dd>
          <dt className="text-ash-500">Current period</dt>
          <dd>
            {formatDay(s.currentPeriodStart)} – {formatDay(s.currentPeriodEnd)}
          </dd>
          {s.scheduledPlanId && (
            <>
              <dt className="text-ash-500">From {formatDay(s.scheduledAt)}</dt>
              <dd data-testid="scheduled-change">{s.cancelAtPeriodEnd ? `Cancelled: moves to ${planName(s.scheduledPlanId)}` : `Moves to ${planName(s.scheduledPlanId)}`}</dd>
            </>
          )}
        </dl>
      )}
      {billing.graceEndsAt && (
        <div role="alert" className="rounded-md border border-amber-300 bg-amber-50 px-3 py-2 text-amber-900">
          The last renewal could not be collected. The plan is kept until {formatDay(billing.graceEndsAt)}; pay the open invoice below (with another card if need be). After that
          the tenant moves to {planName(billing.freePlanId)} — runs, series and settings are kept.
        </div>
      )}
      {s && canManage && (
        <div className="flex gap-2 pt-1">
          {s.cancelAtPeriodEnd ? (
            <Button size="sm" variant="primary" disabled={resume.isPending} onClick={() => resume.mutate()}>
              Keep the subscription
            </Button>
          ) : (
            <ConfirmButton confirmLabel={`Cancel at ${formatDay(s.currentPeriodEnd)}`} disabled={cancel.isPending} onConfirm={() => cancel.mutate()}>
              Cancel subscription
            </ConfirmButton>
          )}
        </div>
      )}
      <ProblemAlert error={cancel.error ?? resume.error} />
    </div>
  );
}

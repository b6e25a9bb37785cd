import { useSearchParams } from 'react-router-dom';
import { PageHeader, Panel } from '@/components/page-header';
import { ProblemAlert } from '@/components/problem-alert';
import { Loading } from '@/components/states';
import { usePlans } from '@/lib/queries/plans';
import { hasPermission, useSession } from '@/lib/session';
import { useBilling } from '../api';
import { InvoiceList } from '../components/invoice-list';
import { PlanComparison } from '../components/plan-comparison';
import { PlanStanding } from '../components/plan-standing';
import { UpcomingInvoicePreview } from '../components/upcoming-invoice';

export function BillingRoute() {
  const [params] = useSearchParams();
  const returned = params.get('checkout');
  const billing = useBilling(returned === 'complete');
  const plans = usePlans();
  const session = useSession();
  const canManage = hasPermission(session.data, 'billing.manage');

  if (billing.isPending || plans.isPending) return <Loading />;
  if (billing.error || plans.error) return <ProblemAlert error={billing.error ?? plans.error} />;
  const b = billing.data;
  const planName = (id: string) => plans.data.items.find((p) => p.id === id)?.name ?? id;
  const pm = b.paymentMethod;
  return (
    <div>
      <PageHeader title="Billing" subtitle={b.enabled ? 'Your plan, its subscription and invoices. Payments are handled by the payment provider.' : undefined} />
      {!b.enabled && (
        <p className="mb-3 rounded-md border border-ash-200 bg-ash-50 px-3 py-2 text-sm text-ash-700">
          Billing is off on this Gridwright: plans are set by operators. Ask one to change yours.
        </p>
      )}
      {returned === 'complete' && b.planSource !== 'subscription' && (
        <p role="status" className="mb-3 rounded-md border border-kiln-200 bg-kiln-50 px-3 py-2 text-sm text-kiln-900">
          Payment done. Waiting for the payment provider to confirm it; the plan changes when it does.
        </p>
      )}
      {returned === 'cancelled' && <p className="mb-3 text-sm text-ash-600">Checkout cancelled; nothing was charged.</p>}
      <div className="grid gap-3 lg:grid-cols-3">
        <Panel title="Plan">
          <PlanStanding billing={b} planName={planName} canManage={canManage} />
        </Panel>
        <Panel title="Next invoice">
          <UpcomingInvoicePreview enabled={b.enabled && b.subscription !== null} />
        </Panel>
        <Panel title="Payment method">
          {pm ? (
            <p className="text-sm" data-testid="payment-method">
              <span className="font-medium capitalize">{pm.brand}</span> ending in <span className="font-mono">{pm.last4}</span>, expires {String(pm.expMonth).padStart(2, '0')}/{pm.expYear}
            </p>
          ) : (
            <p className="text-sm text-ash-500">No card on file.</p>
          )}
          <p className="mt-2 text-xs text-ash-500">The card is kept by the payment provider; Gridwright stores nothing about it. An open invoice can be paid with another card on its page.</p>
        </Panel>
      </div>
      <h2 className="mb-2 mt-5 text-sm font-semibold">Plans</h2>
      <PlanComparison plans={plans.data.items} billing={b} canManage={canManage} />
      {b.enabled && (
        <>
          <h2 className="mb-2 mt-5 text-sm font-semibold">Invoices</h2>
          <InvoiceList enabled={b.customerId !== null} />
        </>
      )}
    </div>
  );
}

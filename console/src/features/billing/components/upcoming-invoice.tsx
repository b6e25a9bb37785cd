import { ProblemAlert } from '@/components/problem-alert';
import { Loading } from '@/components/states';
import { useUpcomingInvoice } from '../api';
import { formatDay, formatMoney } from './money';

/** The next invoice as it stands: the next period's plan, and this period's solver time above the plan so far. */
export function UpcomingInvoicePreview({ enabled }: { enabled: boolean }) {
  const preview = useUpcomingInvoice(enabled);
  if (!enabled) return <p className="text-sm text-ash-500">No subscription, so no invoice is coming.</p>;
  if (preview.isPending) return <Loading />;
  if (preview.error) return <ProblemAlert error={preview.error} />;
  const p = preview.data;
  return (
    <div className="text-[13px]" data-testid="upcoming-invoice">
      <p className="mb-2 text-ash-600">Charged on {formatDay(p.nextPaymentAt)} if nothing changes; usage above the plan counts until then.</p>
      <ul className="divide-y divide-ash-100">
        {p.lines.map((l, i) => (
          <li key={i} className="flex justify-between gap-3 py-1">
            <span>
              {l.description}
              <span className="ml-2 text-xs text-ash-500">
                {formatDay(l.periodStart)} – {formatDay(l.periodEnd)}
              </span>
            </span>
            <span className="font-mono">{formatMoney(l.amount, p.currency)}</span>
          </li>
        ))}
        <li className="flex justify-between gap-3 py-1 font-semibold">
          <span>Total</span>
          <span className="font-mono">{formatMoney(p.total, p.currency)}</span>
        </li>
      </ul>
    </div>
  );
}

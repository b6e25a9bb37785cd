import { useState } from 'react';
import { Button } from '@/components/button';
import { Table, Td, Th } from '@/components/data-table';
import { ProblemAlert } from '@/components/problem-alert';
import { EmptyState, Loading } from '@/components/states';
import { useInvoices } from '../api';
import { formatDay, formatMoney } from './money';

const reasonText: Record<string, string> = {
  subscription_create: 'First month',
  subscription_cycle: 'Renewal',
  subscription_update: 'Plan change',
};

/** The tenant's invoices at the payment provider, a page at a time, each linking to its page there. */
export function InvoiceList({ enabled }: { enabled: boolean }) {
  // Cursors of the pages before the one shown, so "Newer" can go back.
  const [cursors, setCursors] = useState<(string | null)[]>([null]);
  const cursor = cursors[cursors.length - 1] ?? null;
  const invoices = useInvoices(cursor, enabled);
  if (!enabled) return null;
  if (invoices.isPending) return <Loading />;
  if (invoices.error) return <ProblemAlert error={invoices.error} />;
  if (invoices.data.items.length === 0) return <EmptyState title="No invoices yet" />;
  return (
    <div>
      <Table label="Invoices">
        <thead>
          <tr>
            <Th>Number</Th>
            <Th>Issued</Th>
            <Th>For</Th>
            <Th>Status</Th>
            <Th className="text-right">Total</Th>
            <Th />
          </tr>
        </thead>
        <tbody>
          {invoices.data.items.map((i) => (
            <tr key={i.id}>
              <Td className="font-mono text-xs">{i.number ?? i.id}</Td>
              <Td>{formatDay(i.createdAt)}</Td>
              <Td>{(i.reason && reasonText[i.reason]) ?? i.reason ?? ''}</Td>
              <Td className={i.status === 'open' ? 'font-medium text-red-800' : ''}>{i.status === 'open' ? 'Open — to pay' : i.status}</Td>
              <Td className="text-right font-mono">{formatMoney(i.total, i.currency)}</Td>
              <Td className="text-right">
                {i.hostedUrl && (
                  <a className="text-kiln-700 hover:underline" href={i.hostedUrl} target="_blank" rel="noreferrer">
                    {i.status === 'open' ? 'Pay' : 'View'}
                  </a>
                )}
                {i.pdfUrl && (
                  <a className="ml-2 text-kiln-700 hover:underline" href={i.pdfUrl} target="_blank" rel="noreferrer">
                    PDF
                  </a>
                )}
              </Td>
            </tr>
          ))}
        </tbody>
      </Table>
      <div className="mt-2 flex gap-2">
        <Button size="sm" disabled={cursors.length < 2} onClick={() => setCursors(cursors.slice(0, -1))}>
          Newer
        </Button>
        <Button size="sm" disabled={!invoices.data.nextCursor} onClick={() => setCursors([...cursors, invoices.data.nextCursor!])}>
          Older
        </Button>
      </div>
    </div>
  );
}

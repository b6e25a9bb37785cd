import { useState } from 'react';
import { Button } from '@/components/button';
import { Table, Td, Th } from '@/components/data-table';
import { TextField } from '@/components/field';
import { PageHeader, Panel } from '@/components/page-header';
import { ProblemAlert } from '@/components/problem-alert';
import { EmptyState, Loading } from '@/components/states';
import { formatDateTime } from '@/lib/format';
import { useOutbox } from '../api';

export function OutboxRoute() {
  const [kind, setKind] = useState('');
  const [to, setTo] = useState('');
  const [cursors, setCursors] = useState<(string | null)[]>([null]);
  const [openId, setOpenId] = useState<string | null>(null);
  const outbox = useOutbox({ kind: kind.trim(), to: to.trim(), cursor: cursors[cursors.length - 1] });
  const open = outbox.data?.items.find((m) => m.id === openId);
  return (
    <div>
      <PageHeader title="E-mail outbox" subtitle="Every message the service sent, as the mail server received it. Refreshes every few seconds." />
      <form className="mb-3 flex flex-wrap items-end gap-3" role="search" onSubmit={(e) => e.preventDefault()}>
        <TextField label="Kind" className="w-48" placeholder="e.g. invitation" value={kind} onChange={(e) => { setKind(e.target.value); setCursors([null]); }} />
        <TextField label="Recipient" className="w-72" value={to} onChange={(e) => { setTo(e.target.value); setCursors([null]); }} />
      </form>
      <div className="grid gap-4 xl:grid-cols-[1fr_28rem]">
        <div className="min-w-0">
          {outbox.isPending ? (
            <Loading />
          ) : outbox.error ? (
            <ProblemAlert error={outbox.error} />
          ) : outbox.data.items.length === 0 ? (
            <EmptyState title="No messages" />
          ) : (
            <>
              <Table label="Sent e-mail">
                <thead>
                  <tr>
                    <Th>Received</Th>
                    <Th>Kind</Th>
                    <Th>To</Th>
                    <Th>Subject</Th>
                  </tr>
                </thead>
                <tbody>
                  {outbox.data.items.map((m) => (
                    <tr key={m.id} className={m.id === openId ? 'bg-kiln-50' : 'hover:bg-ash-50'}>
                      <Td className="whitespace-nowrap text-xs">{formatDateTime(m.receivedAt)}</Td>
                      <Td className="font-mono text-xs">{m.kind}</Td>
                      <Td className="text-xs">{m.to.join(', ')}</Td>
                      <Td>
                        <button type="button" className="text-left text-[13px] hover:text-kiln-700 hover:underline" onClick={() => setOpenId(m.id)}>
                          {m.subject}
                        </button>
                      </Td>
                    </tr>
                  ))}
                </tbody>
              </Table>
              <div className="mt-2 flex justify-end gap-2">
                <Button size="sm" disabled={cursors.length <= 1} onClick={() => setCursors((c) => c.slice(0, -1))}>← Newer</Button>
                <Button size="sm" disabled={!outbox.data.nextCursor} onClick={() => setCursors((c) => [...c, outbox.data.nextCursor])}>Older →</Button>
              </div>
            </>
          )}
        </div>
        <Panel title={open ? open.subject : 'Message'}>
          {open ? (
            <div className="space-y-2 text-[13px]">
              <p className="text-xs text-ash-500">
                From {open.from} to {open.to.join(', ')} · {formatDateTime(open.receivedAt)}
              </p>
              <pre className="max-h-[32rem] overflow-auto whitespace-pre-wrap rounded bg-ash-50 p-2 font-mono text-xs" data-testid="outbox-message">
                {open.text ?? '(no text part)'}
              </pre>
            </div>
          ) : (
            <p className="text-sm text-ash-500">Pick a message to read it.</p>
          )}
        </Panel>
      </div>
    </div>
  );
}

import http from 'node:http';
import type { AddressInfo } from 'node:net';

export interface ReceivedEvent {
  messageId: string;
  type: string;
  runId: string | null;
}

/** A webhook receiver on loopback that records every event it is sent and answers 204. */
export async function startReceiver(): Promise<{ url: string; events: ReceivedEvent[]; close(): Promise<void> }> {
  const events: ReceivedEvent[] = [];
  const server = http.createServer((req, res) => {
    const chunks: Buffer[] = [];
    req.on('data', (c: Buffer) => chunks.push(c));
    req.on('end', () => {
      try {
        const body = JSON.parse(Buffer.concat(chunks).toString('utf8'));
        events.push({ messageId: String(req.headers['webhook-id'] ?? ''), type: String(body.type), runId: body.data?.runId ?? null });
      } catch {
        events.push({ messageId: String(req.headers['webhook-id'] ?? ''), type: 'unparseable', runId: null });
      }
      res.writeHead(204).end();
    });
  });
  await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
  const { port } = server.address() as AddressInfo;
  return {
    url: `http://127.0.0.1:${port}/hooks`,
    events,
    close: () => new Promise<void>((resolve) => server.close(() => resolve())),
  };
}

/** Distinct messages per run for one event type: exactly-once at the integrator means one each. */
export function messagesPerRun(events: ReceivedEvent[], type: string): Map<string, Set<string>> {
  const per = new Map<string, Set<string>>();
  for (const e of events) {
    if (e.type !== type || !e.runId) continue;
    if (!per.has(e.runId)) per.set(e.runId, new Set());
    per.get(e.runId)!.add(e.messageId);
  }
  return per;
}

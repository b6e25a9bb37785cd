// A real HTTP server on 127.0.0.1 that plays an integrator's webhook endpoint: it records every
// request (headers and raw body) and answers with whatever the test scripts next.
import http from 'node:http';
import type { AddressInfo } from 'node:net';

export interface ReceivedRequest {
  path: string;
  headers: http.IncomingHttpHeaders;
  body: string;
  at: number;
}

/** `until`: the answer is held back until it settles (a receiver that is slow for as long as a test needs). */
export type ScriptedAnswer = { status: number; body?: string; headers?: Record<string, string>; delayMs?: number; until?: Promise<unknown> };

export interface WebhookReceiver {
  url: string;
  received: ReceivedRequest[];
  /** Answers for the next requests, in order; afterwards every request gets 200. */
  script(...answers: ScriptedAnswer[]): void;
  waitFor(count: number, timeoutMs?: number): Promise<ReceivedRequest[]>;
  close(): Promise<void>;
}

export async function startWebhookReceiver(path = '/hooks/gridwright'): Promise<WebhookReceiver & { port: number }> {
  const received: ReceivedRequest[] = [];
  const queue: ScriptedAnswer[] = [];
  const server = http.createServer((req, res) => {
    const chunks: Buffer[] = [];
    req.on('data', (c: Buffer) => chunks.push(c));
    req.on('end', () => {
      received.push({ path: req.url ?? '', headers: req.headers, body: Buffer.concat(chunks).toString('utf8'), at: Date.now() });
      const answer = queue.shift() ?? { status: 200, body: 'ok' };
      const send = () => {
        res.writeHead(answer.status, answer.headers ?? { 'content-type': 'text/plain' });
        res.end(answer.body ?? '');
      };
      if (answer.until) void answer.until.finally(send);
      else if (answer.delayMs) setTimeout(send, answer.delayMs);
      else send();
    });
  });
  await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
  const { port } = server.address() as AddressInfo;
  return {
    port,
    url: `http://127.0.0.1:${port}${path}`,
    received,
    script: (...answers) => queue.push(...answers),
    async waitFor(count, timeoutMs = 20_000) {
      const until = Date.now() + timeoutMs;
      while (received.length < count) {
        if (Date.now() > until) throw new Error(`the receiver got ${received.length} of ${count} requests in ${timeoutMs} ms`);
        await new Promise((r) => setTimeout(r, 50));
      }
      return received.slice(0, count);
    },
    close: () =>
      new Promise<void>((resolve) => {
        server.closeAllConnections();
        server.close(() => resolve());
      }),
  };
}

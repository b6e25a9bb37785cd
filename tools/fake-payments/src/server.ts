// Starts the fake payment provider on loopback: its API under /v1 (and /fake for the clock), the
// hosted pages under /pay, and event deliveries to each account's webhook endpoints.
import type { AddressInfo } from 'node:net';
import type { Server } from 'node:http';
import express, { type NextFunction, type Request, type Response } from 'express';
import { providerApi } from './api';
import { ProviderError } from './errors';
import { startDeliveries } from './events';
import { hostedPages } from './hosted-pages';
import { Ledger } from './ledger';
import { Store } from './store';

export interface FakePaymentProvider {
  /** `http://127.0.0.1:<port>`: the SDK's host and port, and the base of the hosted pages. */
  url: string;
  port: number;
  ledger: Ledger;
  close(): Promise<void>;
}

export interface FakePaymentOptions {
  host?: string;
  port?: number;
  /** Where accounts are kept between starts; in memory only when null. */
  stateFile?: string | null;
  log?: (message: string) => void;
}

export async function startFakePaymentProvider(opts: FakePaymentOptions = {}): Promise<FakePaymentProvider> {
  const host = opts.host ?? '127.0.0.1';
  const log = opts.log ?? (() => {});
  const store = new Store(opts.stateFile ?? null);
  const deliveries = startDeliveries(log);
  const app = express();
  app.disable('x-powered-by');
  app.set('query parser', 'extended');
  app.set('case sensitive routing', true);
  app.set('strict routing', true);

  const server: Server = await new Promise((resolve, reject) => {
    const s = app.listen(opts.port ?? 0, host, () => resolve(s));
    s.on('error', reject);
  });
  const { port } = server.address() as AddressInfo;
  const url = `http://${host}:${port}`;
  const ledger = new Ledger(store, deliveries, url);

  app.use((_req, res, next) => {
    res.set('Request-Id', `req_${Math.random().toString(36).slice(2, 14)}`);
    next();
  });
  app.use(providerApi(ledger));
  app.use(hostedPages(ledger));
  app.use((err: unknown, _req: Request, res: Response, _next: NextFunction) => {
    if (err instanceof ProviderError) return res.status(err.status).json(err.toJSON());
    log(`internal error: ${(err as Error).stack ?? String(err)}`);
    res.status(500).json({ error: { type: 'api_error', message: 'The fake payment provider failed on this request.' } });
  });

  return {
    url,
    port,
    ledger,
    async close() {
      deliveries.stop();
      server.closeAllConnections();
      await new Promise<void>((resolve) => server.close(() => resolve()));
      store.flush();
    },
  };
}

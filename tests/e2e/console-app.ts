// The real app on a fresh database, listening on a free loopback port, with a worker and the demo seed.
import type { AddressInfo } from 'node:net';
import type { Server } from 'node:http';
import { existsSync } from 'node:fs';
import path from 'node:path';
import { seedDemo, type DemoSeed } from '../../api/src/services/demo-seed';
import { startWorkers } from '../../api/src/services/workers';
import { startTestApp, type TestApp } from '../support/test-app';

export interface ConsoleApp {
  url: string;
  testApp: TestApp;
  demo: DemoSeed;
  close(): Promise<void>;
}

export async function startConsoleApp(): Promise<ConsoleApp> {
  if (!existsSync(path.resolve(import.meta.dirname, '../../console/dist/index.html'))) {
    throw new Error('console/dist is missing: `npm test` builds it; run `npm run build:console` first.');
  }
  const testApp = await startTestApp({ QUEUE_POLLING_SECONDS: '0.5' });
  const demo = await seedDemo(testApp.ctx);
  if (!demo) throw new Error('the demo seed found a non-empty database');
  const workers = await startWorkers(testApp.ctx, { concurrency: 1 });
  const server: Server = await new Promise((resolve, reject) => {
    const s = testApp.app.listen(0, '127.0.0.1', () => resolve(s));
    s.on('error', reject);
  });
  const { port } = server.address() as AddressInfo;
  return {
    url: `http://127.0.0.1:${port}`,
    testApp,
    demo,
    async close() {
      await new Promise<void>((resolve) => server.close(() => resolve()));
      await workers.stop();
      await testApp.close();
    },
  };
}

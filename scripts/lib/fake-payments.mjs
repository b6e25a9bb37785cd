// `npm start`'s payment provider: the local fake (tools/fake-payments), kept running like the app, with
// its accounts under the data folder. Node built-ins only. With BILLING_SECRET_KEY set the app talks to
// the provider those keys belong to, and no fake is started.
import { spawn } from 'node:child_process';
import path from 'node:path';
import { createInterface } from 'node:readline';
import { root } from './setup.mjs';
import { supervise } from './supervise.mjs';

/** Starts the fake and resolves once it is listening, with the settings that point the app's SDK at it. */
export async function startFakePayments({ log, dataDir }) {
  if (process.env.BILLING_SECRET_KEY) return { env: {}, stop: async () => {} };
  const host = !process.env.HOST || process.env.HOST === '0.0.0.0' ? '127.0.0.1' : process.env.HOST;
  const appUrl = `http://${host.includes(':') ? `[${host}]` : host}:${process.env.PORT || 8080}`;
  let announce;
  const announced = new Promise((resolve) => (announce = resolve));
  const fake = supervise({
    log: (message) => log(`payments fake: ${message}`),
    start: () => {
      const child = spawn(process.execPath, ['--import', 'tsx', 'tools/fake-payments/src/main.ts'], {
        cwd: root,
        stdio: ['ignore', 'pipe', 'inherit'],
        env: { ...process.env, FAKE_PAYMENTS_DATA: path.join(dataDir, 'fake-payments'), FAKE_PAYMENTS_WEBHOOK_URL: `${appUrl}/hooks/payments` },
      });
      // Its first line says where it listens and which keys the app uses; it keeps them across restarts.
      createInterface({ input: child.stdout }).once('line', (line) => announce(JSON.parse(line)));
      return child;
    },
  });
  const ready = await Promise.race([announced, fake.done.then(() => null)]);
  if (!ready) throw new Error('the local payment provider fake did not start (see its messages above)');
  log(`payments: local fake of the provider on ${ready.url} (test cards only, no money moves)`);
  return {
    env: { BILLING_SECRET_KEY: ready.secretKey, BILLING_WEBHOOK_SECRET: ready.webhookSecret, BILLING_API_URL: ready.url },
    stop: () => fake.stop(),
  };
}

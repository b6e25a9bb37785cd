// `npm start` runs this: the fake payment provider on loopback, its accounts kept under the data
// folder, one account (the local secret key) with a webhook endpoint at Gridwright's receiver. It
// prints one JSON line with the URL and the keys, which scripts/lib/fake-payments.mjs hands to the
// app as BILLING_API_URL, BILLING_SECRET_KEY and BILLING_WEBHOOK_SECRET.
import { randomBytes } from 'node:crypto';
import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { startFakePaymentProvider } from './server';

const dataDir = path.resolve(process.env.FAKE_PAYMENTS_DATA ?? '.data/fake-payments');
const webhookUrl = process.env.FAKE_PAYMENTS_WEBHOOK_URL ?? 'http://127.0.0.1:8080/hooks/payments';
mkdirSync(dataDir, { recursive: true });

interface LocalSettings {
  port: number;
  secretKey: string;
}

const settingsFile = path.join(dataDir, 'settings.json');
const saved: LocalSettings | null = existsSync(settingsFile) ? JSON.parse(readFileSync(settingsFile, 'utf8')) : null;
const log = (message: string) => process.stderr.write(`[fake-payments] ${message}\n`);
const provider = await startFakePaymentProvider({ port: saved?.port ?? 0, stateFile: path.join(dataDir, 'accounts.json'), log });
const settings: LocalSettings = { port: provider.port, secretKey: saved?.secretKey ?? `sk_test_local_${randomBytes(16).toString('hex')}` };
writeFileSync(settingsFile, JSON.stringify(settings, null, 2) + '\n', { mode: 0o600 });

const account = provider.ledger.store.account(settings.secretKey);
let endpoint = Object.values(account.webhookEndpoints).find((e) => e.url === webhookUrl);
if (!endpoint) {
  endpoint = {
    id: `we_local_${randomBytes(6).toString('hex')}`,
    object: 'webhook_endpoint',
    created: Math.floor(Date.now() / 1000),
    url: webhookUrl,
    enabled_events: ['*'],
    status: 'enabled',
    livemode: false,
    metadata: {},
    description: "Gridwright's receiver under npm start",
    secret: `whsec_${randomBytes(24).toString('base64url')}`,
  };
  account.webhookEndpoints[endpoint.id] = endpoint;
  provider.ledger.store.changed();
}
process.stdout.write(JSON.stringify({ ready: true, url: provider.url, secretKey: settings.secretKey, webhookSecret: endpoint.secret }) + '\n');

async function shutdown() {
  await provider.close();
  process.exit(0);
}
process.on('SIGINT', shutdown);
process.on('SIGTERM', shutdown);

// Every account the fake knows, in memory, optionally written to one JSON file so `npm start` keeps
// customers and subscriptions across restarts. An account is named by its secret key: each key the
// fake is called with is an account of its own, so test files sharing one fake never see each other.
import { randomBytes } from 'node:crypto';
import { existsSync, mkdirSync, readFileSync, renameSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { seedCatalogue } from './catalogue';
import type {
  CheckoutSession,
  Customer,
  Invoice,
  Meter,
  MeterEvent,
  PaymentMethod,
  Price,
  Product,
  ProviderEvent,
  Subscription,
  WebhookEndpoint,
} from './objects';

export interface StoredResponse {
  fingerprint: string;
  status: number;
  body: unknown;
}

export interface Account {
  key: string;
  /** Seconds the account's clock runs ahead of the wall clock (moved by the control API to reach renewals). */
  clockOffsetSeconds: number;
  invoiceCounter: number;
  customers: Record<string, Customer>;
  paymentMethods: Record<string, PaymentMethod>;
  products: Record<string, Product>;
  prices: Record<string, Price>;
  meters: Record<string, Meter>;
  checkoutSessions: Record<string, CheckoutSession>;
  subscriptions: Record<string, Subscription>;
  invoices: Record<string, Invoice>;
  meterEvents: MeterEvent[];
  webhookEndpoints: Record<string, WebhookEndpoint>;
  events: ProviderEvent[];
  /** Idempotency-Key → the first answer given to it. */
  idempotency: Record<string, StoredResponse>;
  /** Payment methods of the card that is accepted once and declined after: whether its first charge is still to come. */
  declineAfterFirstCharge: Record<string, { firstChargeDone: boolean }>;
}

const SECRET_KEY = /^sk_test_[A-Za-z0-9_]{8,200}$/;
export const isSecretKey = (key: string) => SECRET_KEY.test(key);

export function newId(prefix: string): string {
  return `${prefix}_${randomBytes(12).toString('base64url').replace(/[-_]/g, 'x')}`;
}

export const nowOf = (account: Pick<Account, 'clockOffsetSeconds'>) => Math.floor(Date.now() / 1000) + account.clockOffsetSeconds;

export class Store {
  private accounts = new Map<string, Account>();
  private saveTimer: NodeJS.Timeout | null = null;

  constructor(private readonly file: string | null) {
    if (file && existsSync(file)) {
      const saved = JSON.parse(readFileSync(file, 'utf8')) as Account[];
      for (const account of saved) this.accounts.set(account.key, account);
    }
  }

  /** The account of a secret key, made (with its catalogue) the first time the key is used. */
  account(key: string): Account {
    let account = this.accounts.get(key);
    if (!account) {
      account = {
        key,
        clockOffsetSeconds: 0,
        invoiceCounter: 0,
        customers: {},
        paymentMethods: {},
        products: {},
        prices: {},
        meters: {},
        checkoutSessions: {},
        subscriptions: {},
        invoices: {},
        meterEvents: [],
        webhookEndpoints: {},
        events: [],
        idempotency: {},
        declineAfterFirstCharge: {},
      };
      seedCatalogue(account);
      this.accounts.set(key, account);
      this.changed();
    }
    return account;
  }

  /** The account holding an object the hosted pages show by id (its id is the capability, as a hosted link's is). */
  accountHolding(kind: 'checkoutSessions' | 'invoices', id: string): Account | null {
    for (const account of this.accounts.values()) if (account[kind][id]) return account;
    return null;
  }

  /** Writes the file a moment after a change, once for a burst of changes. */
  changed() {
    if (!this.file || this.saveTimer) return;
    this.saveTimer = setTimeout(() => {
      this.saveTimer = null;
      this.flush();
    }, 200);
    this.saveTimer.unref();
  }

  flush() {
    if (!this.file) return;
    mkdirSync(path.dirname(this.file), { recursive: true });
    const temporary = `${this.file}.tmp`;
    writeFileSync(temporary, JSON.stringify([...this.accounts.values()]), { mode: 0o600 });
    renameSync(temporary, this.file);
  }
}

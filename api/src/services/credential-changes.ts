// Notices of committed changes to API keys, tenants and plans, sent by the triggers of
// 1780000520000-credential-change-notices.ts and received here on one LISTEN connection per process.
import type pg from 'pg';
import type { DataSource } from 'typeorm';
import { CREDENTIAL_CHANGES_CHANNEL } from '../db/migrations/1780000520000-credential-change-notices';
import type { Logger } from '../lib/logger';

export type CredentialChange = { table: 'api_keys' | 'tenants' | 'plans'; id: string } | { table: 'unknown' };

export interface CredentialChangeHandlers {
  /** A change some process committed. */
  onChange(change: CredentialChange): void;
  /** The listening connection is gone: notices sent from now on are missed until `onListening`. */
  onDeaf(): void;
  /** LISTEN is in place: from now on every committed change arrives. */
  onListening(): void;
}

const RECONNECT_DELAYS_MS = [250, 1000, 5000];

function parseChange(payload: string | undefined): CredentialChange {
  try {
    const change = JSON.parse(payload ?? '') as { table?: unknown; id?: unknown };
    if ((change.table === 'api_keys' || change.table === 'tenants' || change.table === 'plans') && typeof change.id === 'string') {
      return { table: change.table, id: change.id };
    }
  } catch {
    // Anyone who may NOTIFY can send a malformed notice; it is treated as a change to anything.
  }
  return { table: 'unknown' };
}

/**
 * Holds one connection of `db`'s pool in LISTEN and reconnects when it drops. The connection is a
 * TypeORM query runner, so `db.destroy()` releases it and nothing else has to stop the listener.
 */
export function listenForCredentialChanges(db: DataSource, log: Logger, handlers: CredentialChangeHandlers): void {
  let failures = 0;
  const retry = () => {
    const delay = RECONNECT_DELAYS_MS[Math.min(failures++, RECONNECT_DELAYS_MS.length - 1)]!;
    setTimeout(() => void listen(), delay).unref();
  };
  const listen = async () => {
    if (!db.isInitialized) return;
    const runner = db.createQueryRunner();
    const onNotice = (notice: pg.Notification) => {
      if (notice.channel === CREDENTIAL_CHANGES_CHANNEL) handlers.onChange(parseChange(notice.payload));
    };
    let client: pg.PoolClient | null = null;
    try {
      client = (await runner.connect()) as pg.PoolClient;
      client.on('notification', onNotice);
      await runner.query(`LISTEN ${CREDENTIAL_CHANGES_CHANNEL}`);
    } catch (err) {
      if (db.isInitialized) log.warn({ err }, 'cannot listen for credential changes; cached keys and tenants are not used until it can');
      client?.removeListener('notification', onNotice);
      await runner.release();
      retry();
      return;
    }
    client.once('end', () => {
      handlers.onDeaf();
      retry();
    });
    failures = 0;
    handlers.onListening();
  };
  void listen();
}

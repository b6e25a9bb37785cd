// One connection of a data source's pool held in LISTEN on a channel, for the caches of an API
// process that drop entries on change notices sent by triggers (credential-cache.ts, run-view-cache.ts).
import type pg from 'pg';
import type { DataSource } from 'typeorm';
import type { Logger } from '../lib/logger';

export interface NoticeHandlers {
  /** A notice some process committed, with its payload as sent. */
  onNotice(payload: string | undefined): void;
  /** The listening connection is gone: notices sent from now on are missed until `onListening`. */
  onDeaf(): void;
  /** LISTEN is in place: from now on every committed notice arrives. */
  onListening(): void;
}

const RECONNECT_DELAYS_MS = [250, 1000, 5000];

/**
 * Listens on `channel` and reconnects when the connection drops. The connection is a TypeORM query
 * runner, so `db.destroy()` releases it and nothing else has to stop the listener. `cached` names
 * what goes unused while the process cannot listen, for the warning.
 */
export function listenForNotices(db: DataSource, log: Logger, channel: string, cached: string, handlers: NoticeHandlers): void {
  let failures = 0;
  const retry = () => {
    const delay = RECONNECT_DELAYS_MS[Math.min(failures++, RECONNECT_DELAYS_MS.length - 1)]!;
    setTimeout(() => void listen(), delay).unref();
  };
  const listen = async () => {
    if (!db.isInitialized) return;
    const runner = db.createQueryRunner();
    const onNotice = (notice: pg.Notification) => {
      if (notice.channel === channel) handlers.onNotice(notice.payload);
    };
    let client: pg.PoolClient | null = null;
    try {
      client = (await runner.connect()) as pg.PoolClient;
      client.on('notification', onNotice);
      await runner.query(`LISTEN ${channel}`);
    } catch (err) {
      if (db.isInitialized) log.warn({ err }, `cannot listen for ${channel}; ${cached} are not used until it can`);
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

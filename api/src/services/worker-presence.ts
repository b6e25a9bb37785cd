import { EventEmitter } from 'node:events';
import pg from 'pg';
import type { Logger } from '../lib/logger';

/** First key of every presence lock (the two-key form of PostgreSQL's advisory locks). */
export const PRESENCE_LOCK_NAMESPACE = 0x67770001;

/** The channel every enqueue notifies with the name of its queue. */
export const QUEUE_WAKE_CHANNEL = 'gridwright_queue';

// Server-side keepalives on the presence connection: when a worker's host vanishes without
// closing its socket, PostgreSQL ends the session (and frees the lock) after about
// idle + interval × count = 11 s instead of the operating system's two hours.
const KEEPALIVE = { idleSeconds: 5, intervalSeconds: 2, count: 3 };
const RECONNECT_FIRST_MS = 250;
const RECONNECT_MAX_MS = 5_000;

/**
 * A query for the workers present in this database, as `hashtext(worker id)::oid` in the column
 * `objid`. Read from `pg_locks`, so it has no side effect and sees every session. Two ids whose
 * `hashtext` collide would hide each other's death; the heartbeat backstop still catches it.
 */
export function presentWorkerHashesSql(): string {
  return `SELECT l.objid FROM pg_locks l
           WHERE l.locktype = 'advisory' AND l.granted AND l.objsubid = 2 AND l.classid = ${PRESENCE_LOCK_NAMESPACE}::oid
             AND l.database = (SELECT oid FROM pg_database WHERE datname = current_database())`;
}

/**
 * A worker process's presence in the database, and its doorbell.
 *
 * One connection per worker process holds a session advisory lock named after the worker for
 * as long as the process lives. PostgreSQL drops the lock the moment that connection ends — the
 * process was killed, crashed or exited — so whether a worker is alive is read from the lock table,
 * never guessed from elapsed time: a slow or busy worker is not mistaken for a dead one.
 *
 * The same connection LISTENs on QUEUE_WAKE_CHANNEL, so an idle queue consumer starts a job as
 * soon as it is committed instead of at its next poll. When the connection drops (a database
 * restart), the lock is gone until it reconnects; `held` says so and consumers stop taking runs.
 */
export class WorkerPresence {
  private client: pg.Client | null = null;
  private locked = false;
  private stopping = false;
  private retryMs = RECONNECT_FIRST_MS;
  private reconnectTimer: NodeJS.Timeout | null = null;
  private readonly events = new EventEmitter();

  constructor(private readonly opts: { databaseUrl: string; workerId: string; log: Logger }) {
    this.events.setMaxListeners(0);
  }

  /** Whether this process holds its presence lock right now. */
  get held(): boolean {
    return this.locked;
  }

  /** Connects, takes the lock and listens; rejects if the first connection fails. */
  async start(): Promise<void> {
    await this.connect();
  }

  /** Calls `listener` whenever `queue` is notified, and when presence is regained after a drop. */
  onWake(queue: string, listener: () => void): () => void {
    this.events.on(queue, listener);
    this.events.on('regained', listener);
    return () => {
      this.events.off(queue, listener);
      this.events.off('regained', listener);
    };
  }

  async stop(): Promise<void> {
    this.stopping = true;
    if (this.reconnectTimer) clearTimeout(this.reconnectTimer);
    const client = this.client;
    this.client = null;
    this.locked = false;
    await client?.end().catch(() => {});
  }

  private async connect(): Promise<void> {
    const client = new pg.Client({ connectionString: this.opts.databaseUrl, application_name: 'gridwright-presence', keepAlive: true });
    client.on('error', (err) => this.opts.log.warn({ err }, 'presence connection failed'));
    client.on('end', () => this.lost(client));
    client.on('notification', (n) => {
      if (n.channel === QUEUE_WAKE_CHANNEL && n.payload) this.events.emit(n.payload);
    });
    try {
      await client.connect();
      await client.query(
        `SELECT set_config('tcp_keepalives_idle', $1, false), set_config('tcp_keepalives_interval', $2, false), set_config('tcp_keepalives_count', $3, false)`,
        [String(KEEPALIVE.idleSeconds), String(KEEPALIVE.intervalSeconds), String(KEEPALIVE.count)],
      );
      const [{ locked }] = (await client.query('SELECT pg_try_advisory_lock($1, hashtext($2)) AS locked', [PRESENCE_LOCK_NAMESPACE, this.opts.workerId])).rows;
      if (!locked) throw new Error(`another live process holds the presence lock of worker ${this.opts.workerId}`);
      await client.query(`LISTEN ${QUEUE_WAKE_CHANNEL}`);
    } catch (err) {
      client.removeAllListeners('end');
      await client.end().catch(() => {});
      throw err;
    }
    if (this.stopping) {
      await client.end().catch(() => {});
      return;
    }
    this.client = client;
    this.locked = true;
    this.retryMs = RECONNECT_FIRST_MS;
  }

  private lost(client: pg.Client): void {
    if (client !== this.client) return;
    this.client = null;
    this.locked = false;
    if (this.stopping) return;
    this.opts.log.warn({ workerId: this.opts.workerId }, 'presence lost; reconnecting');
    this.scheduleReconnect();
  }

  private scheduleReconnect(): void {
    this.reconnectTimer = setTimeout(() => {
      this.reconnectTimer = null;
      this.connect().then(
        () => {
          if (this.stopping) return;
          this.opts.log.info({ workerId: this.opts.workerId }, 'presence regained');
          this.events.emit('regained');
        },
        (err) => {
          if (this.stopping) return;
          this.opts.log.warn({ err }, 'presence reconnect failed');
          this.retryMs = Math.min(RECONNECT_MAX_MS, this.retryMs * 2);
          this.scheduleReconnect();
        },
      );
    }, this.retryMs);
    this.reconnectTimer.unref();
  }
}

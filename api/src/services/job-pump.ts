import type PgBoss from 'pg-boss';
import { retryWhileDatabaseUnavailable } from '../lib/database-retry';
import type { Logger } from '../lib/logger';

export interface JobPumpOptions<T> {
  boss: PgBoss;
  queue: string;
  /** Jobs handled at once. */
  slots: number;
  /** How long an idle pump waits for a wake-up before it looks at the queue anyway. */
  pollMs: number;
  log: Logger;
  /** Jobs are fetched only while this holds. */
  canFetch?: () => boolean;
  /** Resolving completes the job; throwing fails it, and pg-boss retries it as its queue says. */
  handle: (job: PgBoss.JobWithMetadata<T>) => Promise<void>;
}

/**
 * Pulls jobs from one pg-boss queue into a fixed number of slots. pg-boss's own `work()` fetches
 * once per polling interval (half a second at the least) however quickly its jobs end, so a
 * consumer of 50 ms jobs idled most of the time. A pump asks for exactly as many jobs as it has
 * free slots, asks again the moment a slot frees, and sleeps only while the queue is empty: until
 * `wake()` (wired to LISTEN/NOTIFY) or the poll interval. It never takes a job it cannot start, so
 * no job waits behind a busy consumer while another consumer is free, and priorities hold.
 */
export class JobPump<T> {
  private readonly inFlight = new Map<string, Promise<void>>();
  private stopped = false;
  private woken = false;
  private wakeUp: (() => void) | null = null;
  private loop: Promise<void> = Promise.resolve();

  constructor(private readonly opts: JobPumpOptions<T>) {}

  start(): this {
    this.loop = this.run();
    return this;
  }

  /** Look at the queue now (a job was committed, a slot freed, the consumer may fetch again). */
  wake(): void {
    this.woken = true;
    this.wakeUp?.();
  }

  /** The ids of the jobs fetched and not yet settled. */
  inFlightJobIds(): string[] {
    return [...this.inFlight.keys()];
  }

  /** Stops fetching and waits for the jobs in hand to settle, or `graceMs`, whichever is first. */
  async stop(graceMs = Infinity): Promise<void> {
    this.stopped = true;
    this.wake();
    await this.loop;
    const settled = Promise.allSettled(this.inFlight.values());
    if (graceMs === Infinity) {
      await settled;
      return;
    }
    let timer: NodeJS.Timeout | undefined;
    await Promise.race([settled, new Promise((resolve) => (timer = setTimeout(resolve, graceMs)))]);
    clearTimeout(timer);
  }

  private async run(): Promise<void> {
    while (!this.stopped) {
      const free = this.opts.slots - this.inFlight.size;
      if (free > 0 && (this.opts.canFetch?.() ?? true)) {
        // pg-boss answers an empty list when the database cannot be reached, so an outage is an idle spell.
        const jobs = await this.opts.boss.fetch<T>(this.opts.queue, { batchSize: free, includeMetadata: true });
        for (const job of jobs) this.dispatch(job);
        if (jobs.length === free) continue;
      }
      await this.sleep();
    }
  }

  private dispatch(job: PgBoss.JobWithMetadata<T>): void {
    const { boss, queue, log } = this.opts;
    // A job left active by a settlement lost to an outage would wait for its expiry; keep trying.
    const settle = (write: () => Promise<unknown>) =>
      retryWhileDatabaseUnavailable(write, { log, what: 'settling a job', giveUp: () => this.stopped }).catch((err) =>
        log.warn({ err, queue, jobId: job.id }, 'could not settle the job; it is retried once it expires'),
      );
    const settled = (async () => {
      try {
        await this.opts.handle(job);
      } catch (err) {
        log.warn({ err, queue, jobId: job.id }, 'job failed; the queue retries it');
        await settle(() => boss.fail(queue, job.id, { message: (err as Error).message }));
        return;
      }
      await settle(() => boss.complete(queue, job.id));
    })().finally(() => {
      this.inFlight.delete(job.id);
      this.wake();
    });
    this.inFlight.set(job.id, settled);
  }

  private sleep(): Promise<void> {
    if (this.woken || this.stopped) {
      this.woken = false;
      return Promise.resolve();
    }
    return new Promise((resolve) => {
      const done = () => {
        clearTimeout(timer);
        this.wakeUp = null;
        this.woken = false;
        resolve();
      };
      const timer = setTimeout(done, this.opts.pollMs);
      this.wakeUp = done;
    });
  }
}

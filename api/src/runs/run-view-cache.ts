// What an API process remembers of the runs it served: the JSON text of `GET /v1/runs/{id}` and its
// ETag, so a poll neither reads PostgreSQL nor serialises the run again. A finished run's row is
// final, so its view is kept until memory runs short. A run still queued or running changes: every
// process drops its view on the change notice the run's row sends on commit (migration
// 1780000780000-run-change-notices.ts), whoever changed it, and keeps it at most
// RUN_CACHE_SECONDS should a notice be lost some other way.
import { LRUCache } from 'lru-cache';
import type { DataSource } from 'typeorm';
import type { AppContext } from '../context';
import { RUN_CHANGES_CHANNEL } from '../db/migrations/1780000780000-run-change-notices';
import { listenForNotices } from '../db/notice-listener';

export interface RunViewText {
  json: string;
  /** Absent when the app makes no ETags. */
  etag?: string;
  final: boolean;
}

/** Bytes of views one process keeps; a view larger than a sixteenth of it is not kept. */
const VIEWS_BYTES = 64 * 2 ** 20;

// Ids are UUIDs, which PostgreSQL matches in either case while notices name them in lower case.
const keyOf = (tenantId: string, id: string) => `${tenantId}/${id.toLowerCase()}`;

export class RunViewCache {
  /** Bumped by every change and every gap in listening: a view read across one is served but not kept. */
  private generation = 0;
  private listening = false;
  private readonly views = new LRUCache<string, RunViewText>({ maxSize: VIEWS_BYTES, maxEntrySize: VIEWS_BYTES / 16, sizeCalculation: (v) => v.json.length });

  constructor(readonly unfinishedTtlMs: number) {}

  get(tenantId: string, id: string): RunViewText | undefined {
    return this.views.get(keyOf(tenantId, id));
  }

  /** Taken before the run's row is read, and given back to `keep`. */
  readStarted(): number {
    return this.generation;
  }

  /** Keeps `view` unless a change may have slipped past the read that made it. */
  keep(tenantId: string, id: string, view: RunViewText, readStarted: number): void {
    if (readStarted !== this.generation) return;
    if (view.final) this.views.set(keyOf(tenantId, id), view);
    else if (this.listening && this.unfinishedTtlMs > 0) this.views.set(keyOf(tenantId, id), view, { ttl: this.unfinishedTtlMs });
  }

  forget(tenantId: string, id: string): void {
    this.generation++;
    this.views.delete(keyOf(tenantId, id));
  }

  /** Drops every view that could change: all but the finished runs' (a deleted run's goes on its notice). */
  forgetUnfinished(): void {
    this.generation++;
    for (const [key, view] of this.views.entries()) if (!view.final) this.views.delete(key);
  }

  setListening(listening: boolean): void {
    this.listening = listening;
    this.forgetUnfinished();
  }

  get size(): number {
    return this.views.size;
  }
}

function parseChange(payload: string | undefined): { tenantId: string; id: string } | null {
  try {
    const change = JSON.parse(payload ?? '') as { tenantId?: unknown; id?: unknown };
    if (typeof change.tenantId === 'string' && typeof change.id === 'string') return { tenantId: change.tenantId, id: change.id };
  } catch {
    // Anyone who may NOTIFY can send a malformed notice; it is treated as a change to any run.
  }
  return null;
}

const caches = new WeakMap<DataSource, RunViewCache>();

/** The process's cache for `ctx.db`; the first call starts listening for change notices. */
export function runViewCacheFor(ctx: AppContext): RunViewCache {
  let cache = caches.get(ctx.db);
  if (!cache) {
    const created = new RunViewCache(ctx.config.runCacheSeconds * 1000);
    caches.set(ctx.db, created);
    listenForNotices(ctx.db, ctx.log, RUN_CHANGES_CHANNEL, 'views of unfinished runs', {
      onNotice: (payload) => {
        const change = parseChange(payload);
        if (change) created.forget(change.tenantId, change.id);
        else created.forgetUnfinished();
      },
      onDeaf: () => created.setListening(false),
      onListening: () => created.setListening(true),
    });
    cache = created;
  }
  return cache;
}

/** Drops this process's view of a run it has just changed, before it answers. */
export function forgetRunView(ctx: AppContext, tenantId: string, id: string): void {
  caches.get(ctx.db)?.forget(tenantId, id);
}

// What an API process remembers between requests about the keys and tenants that authenticate
// them, so a read does not look them up again. Every process drops an entry as soon as the change
// notice of its row arrives (credential-changes.ts), and its own changes drop theirs before they
// answer; the time to live bounds how long a missed notice could leave an entry stale.
import { LRUCache } from 'lru-cache';
import type { DataSource } from 'typeorm';
import type { AppContext } from '../context';
import type { ApiKey } from '../db/entities/api-key';
import type { Plan } from '../db/entities/plan';
import type { Tenant } from '../db/entities/tenant';
import { listenForCredentialChanges, type CredentialChange } from './credential-changes';

export interface TenantAndPlan {
  tenant: Tenant;
  plan: Plan;
}

const MAX_ENTRIES = 10_000;

export class CredentialCache {
  /** Bumped by every change and every gap in listening: a load that spans one is used but not kept. */
  private generation = 0;
  private listening = false;
  /** By the SHA-256 of the whole key, the lookup every request makes anyway. */
  readonly apiKeys: LRUCache<string, ApiKey>;
  readonly tenants: LRUCache<string, TenantAndPlan>;

  constructor(readonly ttlMs: number) {
    const options = { max: MAX_ENTRIES, ttl: Math.max(1, ttlMs) };
    this.apiKeys = new LRUCache(options);
    this.tenants = new LRUCache(options);
  }

  /** The cached value of `key`, or `load()`'s, kept only when no change could have slipped past it. */
  async read<V extends object>(cache: LRUCache<string, V>, key: string, load: () => Promise<V | null>): Promise<V | null> {
    const cached = cache.get(key);
    if (cached) return cached;
    const generation = this.generation;
    const loaded = await load();
    if (loaded && this.listening && this.ttlMs > 0 && generation === this.generation) cache.set(key, loaded);
    return loaded;
  }

  /** Drops what `change` may have made stale. */
  forget(change: CredentialChange): void {
    this.generation++;
    if (change.table === 'api_keys') {
      for (const [hash, key] of this.apiKeys.entries()) if (key.id === change.id) this.apiKeys.delete(hash);
    } else if (change.table === 'tenants') {
      this.tenants.delete(change.id);
    } else if (change.table === 'plans') {
      this.tenants.clear();
    } else {
      this.forgetAll();
    }
  }

  forgetAll(): void {
    this.generation++;
    this.apiKeys.clear();
    this.tenants.clear();
  }

  setListening(listening: boolean): void {
    this.listening = listening;
    this.forgetAll();
  }
}

const caches = new WeakMap<DataSource, CredentialCache>();

/** The process's cache for `ctx.db`; the first call starts listening for change notices. */
export function credentialCacheFor(ctx: AppContext): CredentialCache {
  let cache = caches.get(ctx.db);
  if (!cache) {
    const created = new CredentialCache(ctx.config.credentialCacheSeconds * 1000);
    caches.set(ctx.db, created);
    if (created.ttlMs > 0) {
      listenForCredentialChanges(ctx.db, ctx.log, {
        onChange: (change) => created.forget(change),
        onDeaf: () => created.setListening(false),
        onListening: () => created.setListening(true),
      });
    }
    cache = created;
  }
  return cache;
}

/** Drops this process's copy of what `change` touched, when it keeps one (API processes do; CLIs and workers do not). */
export function forgetCredentialChange(ctx: AppContext, change: CredentialChange): void {
  caches.get(ctx.db)?.forget(change);
}

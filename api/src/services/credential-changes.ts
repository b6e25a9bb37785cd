// Notices of committed changes to API keys, tenants and plans, sent by the triggers of
// 1780000520000-credential-change-notices.ts and received here on one LISTEN connection per process.
import type { DataSource } from 'typeorm';
import { CREDENTIAL_CHANGES_CHANNEL } from '../db/migrations/1780000520000-credential-change-notices';
import { listenForNotices } from '../db/notice-listener';
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

export function listenForCredentialChanges(db: DataSource, log: Logger, handlers: CredentialChangeHandlers): void {
  listenForNotices(db, log, CREDENTIAL_CHANGES_CHANNEL, 'cached keys and tenants', {
    onNotice: (payload) => handlers.onChange(parseChange(payload)),
    onDeaf: handlers.onDeaf,
    onListening: handlers.onListening,
  });
}

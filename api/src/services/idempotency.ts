import { createHash } from 'node:crypto';
import canonicalize from 'canonicalize';
import type { EntityManager } from 'typeorm';
import { HttpProblem } from '../lib/problem';

/**
 * Idempotency-Key handling after the IETF httpapi "The Idempotency-Key HTTP Header Field" draft:
 * keys are per tenant, remembered with a fingerprint of the body for `hours`, and a reuse with a
 * different body is refused with 422. Concurrent first uses are serialised by the primary key:
 * the second INSERT waits for the first transaction and then sees its row.
 */
export const IDEMPOTENCY_KEY_PATTERN = /^[\x21-\x7e]{1,255}$/;

/** RFC 8785 (JSON Canonicalization Scheme): the same JSON value gives the same fingerprint whatever the key order or whitespace. */
export function bodyFingerprint(body: unknown): string {
  return createHash('sha256').update(canonicalize(body) ?? '').digest('hex');
}

export function parseIdempotencyKey(header: string | undefined): string | null {
  if (header === undefined) return null;
  // The draft sends the key as a Structured Field string: "abc"; bare tokens are accepted too.
  const key = header.trim().replace(/^"(.*)"$/, '$1');
  if (!IDEMPOTENCY_KEY_PATTERN.test(key)) {
    throw new HttpProblem({
      status: 400,
      slug: 'invalid-idempotency-key',
      title: 'Invalid Idempotency-Key',
      detail: 'The Idempotency-Key header must be 1–255 visible ASCII characters.',
      errors: [{ pointer: '', message: 'header Idempotency-Key: 1–255 visible ASCII characters' }],
    });
  }
  return key;
}

export type IdempotencyClaim = { fresh: true } | { fresh: false; runId: string };

/**
 * Claims `key` for this request inside `manager`'s transaction. Fresh: the caller creates the run
 * and calls `bindIdempotencyKey`. Not fresh: the key already names a run (same body) — return it.
 */
export async function claimIdempotencyKey(
  manager: EntityManager,
  opts: { tenantId: string; key: string; fingerprint: string; hours: number },
): Promise<IdempotencyClaim> {
  const inserted: unknown[] = await manager.query(
    `INSERT INTO idempotency_keys (tenant_id, key, fingerprint, expires_at)
     VALUES ($1, $2, $3, now() + make_interval(secs => $4))
     ON CONFLICT (tenant_id, key) DO UPDATE
       SET fingerprint = EXCLUDED.fingerprint, run_id = NULL, created_at = now(), expires_at = EXCLUDED.expires_at
       WHERE idempotency_keys.expires_at <= now()
     RETURNING key`,
    [opts.tenantId, opts.key, opts.fingerprint, opts.hours * 3600],
  );
  if (inserted.length) return { fresh: true };
  const [row]: { fingerprint: string; run_id: string | null }[] = await manager.query(
    'SELECT fingerprint, run_id FROM idempotency_keys WHERE tenant_id = $1 AND key = $2',
    [opts.tenantId, opts.key],
  );
  if (row.fingerprint !== opts.fingerprint) {
    throw new HttpProblem({
      status: 422,
      slug: 'idempotency-key-reused',
      title: 'Idempotency-Key already used for a different request',
      detail: 'This Idempotency-Key was sent before with a different body. Use a new key for a new request.',
      errors: [{ pointer: '', message: 'header Idempotency-Key: already used with a different body' }],
    });
  }
  if (!row.run_id) {
    // Only possible if the first request's transaction bound no run, which it never commits.
    throw new HttpProblem({ status: 409, slug: 'idempotency-key-in-use', title: 'Request in progress', detail: 'A request with this Idempotency-Key is still being processed; retry shortly.' });
  }
  return { fresh: false, runId: row.run_id };
}

export async function bindIdempotencyKey(manager: EntityManager, opts: { tenantId: string; key: string; runId: string }) {
  await manager.query('UPDATE idempotency_keys SET run_id = $3 WHERE tenant_id = $1 AND key = $2', [opts.tenantId, opts.key, opts.runId]);
}

/** Forgets keys past their expiry; run by the worker's maintenance tick. */
export async function purgeExpiredIdempotencyKeys(manager: EntityManager): Promise<number> {
  const res = await manager.query('DELETE FROM idempotency_keys WHERE expires_at <= now()');
  return Array.isArray(res) ? Number(res[1] ?? 0) : 0;
}

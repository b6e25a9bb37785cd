import type { MigrationInterface, QueryRunner } from 'typeorm';

/** The channel every API process listens on to drop what it cached about keys, tenants and plans. */
export const CREDENTIAL_CHANGES_CHANNEL = 'credential_changes';

/**
 * Triggers that announce, on commit, a change to an API key, a tenant or a plan, whatever changed
 * it (a route, the admin CLI, plain SQL): each API process caches them for a few seconds and drops
 * its copy on the notice (api/src/services/credential-cache.ts). `last_used_at` is bookkeeping that
 * every cached key writes once a minute, so it announces nothing.
 */
export class CredentialChangeNotices1780000520000 implements MigrationInterface {
  name = 'CredentialChangeNotices1780000520000';

  async up(q: QueryRunner): Promise<void> {
    await q.query(`
      CREATE FUNCTION notify_credential_change() RETURNS trigger LANGUAGE plpgsql AS $$
      BEGIN
        PERFORM pg_notify('${CREDENTIAL_CHANGES_CHANNEL}', json_build_object('table', TG_TABLE_NAME, 'id', OLD.id)::text);
        RETURN NULL;
      END $$`);
    await q.query(`
      CREATE TRIGGER api_keys_credential_change
        AFTER UPDATE OF tenant_id, prefix, secret_hash, scopes, expires_at, revoked_at OR DELETE ON api_keys
        FOR EACH ROW EXECUTE FUNCTION notify_credential_change()`);
    await q.query(`CREATE TRIGGER tenants_credential_change AFTER UPDATE OR DELETE ON tenants FOR EACH ROW EXECUTE FUNCTION notify_credential_change()`);
    await q.query(`CREATE TRIGGER plans_credential_change AFTER UPDATE OR DELETE ON plans FOR EACH ROW EXECUTE FUNCTION notify_credential_change()`);
  }

  async down(q: QueryRunner): Promise<void> {
    for (const table of ['plans', 'tenants', 'api_keys']) await q.query(`DROP TRIGGER ${table}_credential_change ON ${table}`);
    await q.query('DROP FUNCTION notify_credential_change()');
  }
}

import type { MigrationInterface, QueryRunner } from 'typeorm';

/**
 * `reserve_rate_points(keys, wanted, quotas, window_ms)`: one round trip in which an API process
 * takes a batch of request points for several counters of `rate_limits` at once
 * (api/src/services/rate-limits.ts). Each counter is a fixed window on the database's clock: a
 * counter whose window has ended starts a new one; a grant never lifts a counter above its quota,
 * so all processes together admit at most the quota per window. Rows are locked in key order, so
 * two calls never wait on each other in a cycle.
 */
export class RatePointReservations1780000530000 implements MigrationInterface {
  name = 'RatePointReservations1780000530000';

  async up(q: QueryRunner): Promise<void> {
    await q.query(`
      CREATE FUNCTION reserve_rate_points(counter_keys text[], wanted integer[], quotas integer[], window_ms bigint)
      RETURNS TABLE (counter_key text, granted integer, counted integer, ms_left bigint)
      LANGUAGE plpgsql AS $$
      DECLARE
        now_ms bigint := floor(extract(epoch FROM clock_timestamp()) * 1000);
        i integer;
        points_before integer;
        window_end bigint;
      BEGIN
        FOR i IN SELECT g FROM generate_subscripts(counter_keys, 1) AS g ORDER BY counter_keys[g] LOOP
          SELECT r.points, r.expire INTO points_before, window_end FROM rate_limits r WHERE r.key = counter_keys[i] FOR UPDATE;
          IF NOT FOUND THEN
            INSERT INTO rate_limits (key, points, expire) VALUES (counter_keys[i], 0, now_ms + window_ms) ON CONFLICT (key) DO NOTHING;
            SELECT r.points, r.expire INTO points_before, window_end FROM rate_limits r WHERE r.key = counter_keys[i] FOR UPDATE;
          END IF;
          IF window_end IS NULL OR window_end <= now_ms THEN
            points_before := 0;
            window_end := now_ms + window_ms;
          END IF;
          counter_key := counter_keys[i];
          granted := greatest(0, least(wanted[i], quotas[i] - points_before));
          counted := points_before + granted;
          ms_left := window_end - now_ms;
          UPDATE rate_limits r SET points = counted, expire = window_end WHERE r.key = counter_keys[i];
          RETURN NEXT;
        END LOOP;
      END $$`);
  }

  async down(q: QueryRunner): Promise<void> {
    await q.query('DROP FUNCTION reserve_rate_points(text[], integer[], integer[], bigint)');
  }
}

// One list of run states (RUN_STATUSES in shared/src/run-result.ts): the database's constraint,
// the OpenAPI document and the state machine's transitions must all say the same.
import { readFileSync } from 'node:fs';
import pg from 'pg';
import { parse as parseYaml } from 'yaml';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { RUN_STATUSES, type RunStatus } from '@gridwright/shared/run-result';
import { openapiPath } from '../../../api/src/app';
import { RUN_TRANSITIONS } from '../../../api/src/runs/states';
import { createTestDatabase } from '../../support/database';

describe('the list of run states', () => {
  let db: Awaited<ReturnType<typeof createTestDatabase>>;
  let client: pg.Client;
  beforeAll(async () => {
    db = await createTestDatabase();
    client = new pg.Client({ connectionString: db.url });
    await client.connect();
  });
  afterAll(async () => {
    await client.end();
    await db.drop();
  });

  it('is what the migrated runs.status CHECK constraint admits', async () => {
    const { rows } = await client.query(
      `SELECT pg_get_constraintdef(oid) AS def FROM pg_constraint WHERE conrelid = 'runs'::regclass AND contype = 'c' AND conname = 'runs_status_check'`,
    );
    expect(rows).toHaveLength(1);
    const admitted = [...(rows[0].def as string).matchAll(/'([^']+)'::text/g)].map((m) => m[1]);
    expect(admitted).toEqual([...RUN_STATUSES]);
  });

  it("is the OpenAPI document's enum of Run.status", () => {
    const doc = parseYaml(readFileSync(openapiPath, 'utf8'));
    let status = doc.components.schemas.Run.properties.status;
    while (status.$ref) status = status.$ref.split('/').slice(1).reduce((node: any, part: string) => node[part], doc);
    expect(status.enum).toEqual([...RUN_STATUSES]);
  });

  it('are all reachable from queued, and the finished ones are exactly those no transition leaves', () => {
    const moves = Object.values(RUN_TRANSITIONS) as { from: readonly RunStatus[]; to: RunStatus | readonly RunStatus[] }[];
    const reached = new Set<RunStatus>(['queued']);
    for (let grew = true; grew; ) {
      grew = false;
      for (const { from, to } of moves) {
        if (!from.some((s) => reached.has(s))) continue;
        for (const s of [to].flat()) {
          if (reached.has(s)) continue;
          reached.add(s);
          grew = true;
        }
      }
    }
    expect([...reached].sort()).toEqual([...RUN_STATUSES].sort());
    const left = new Set(moves.flatMap((m) => m.from));
    // README "Scaling out": queued → running → succeeded | failed | cancelled.
    expect(RUN_STATUSES.filter((s) => !left.has(s))).toEqual(['succeeded', 'failed', 'cancelled']);
  });
});

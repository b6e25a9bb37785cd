import { execFile } from 'node:child_process';
import { mkdtempSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { promisify } from 'node:util';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { openapiPath } from '../../../api/src/app';
import { User } from '../../../api/src/db/entities/user';
import { DEMO_ACCOUNTS, seedDemo } from '../../../api/src/services/demo-seed';
import { startTestApp, type TestApp } from '../../support/test-app';

const run = promisify(execFile);
const root = path.resolve(openapiPath, '../..');

describe('the operator CLI', () => {
  let t: TestApp;
  let admin: (...args: string[]) => Promise<{ stdout: string; stderr: string }>;
  beforeAll(async () => {
    t = await startTestApp();
    const env = { ...process.env, DATABASE_URL: t.databaseUrl, GRIDWRIGHT_DATA: mkdtempSync(path.join(os.tmpdir(), 'gw-cli-')), LOG_LEVEL: 'silent', NODE_ENV: 'test', TSX_TSCONFIG_PATH: 'api/tsconfig.json' };
    admin = (...args) => run(process.execPath, ['--import', 'tsx', 'api/src/cli/admin.ts', ...args], { cwd: root, env });
  });
  afterAll(async () => t.close());

  it('creates a tenant, a user with a temporary password, an invitation, and a key on its last line', async () => {
    const tenant = await admin('create-tenant', 'wind-ridge', '--plan', 'field');
    expect(tenant.stdout).toMatch(/^tenant wind-ridge \(.+\) on plan field$/m);

    const user = await admin('create-user', 'lena@wind-ridge.example', '--tenant', 'wind-ridge', '--role', 'owner');
    const password = user.stdout.trim().split('\n').at(-1)!;
    await request(t.app).post('/v1/auth/sign-in').send({ email: 'lena@wind-ridge.example', password }).expect(200);

    const invited = await admin('create-user', 'sam@wind-ridge.example', '--tenant', 'wind-ridge', '--role', 'viewer', '--invite');
    expect(invited.stdout.trim().split('\n').at(-1)).toMatch(/\/accept-invitation\?token=[\w-]+$/);

    const key = await admin('create-key', '--tenant', 'wind-ridge', '--scopes', 'runs:read');
    const lastLine = key.stdout.trim().split('\n').at(-1)!;
    expect(lastLine).toMatch(/^gw_[0-9a-f]{12}_[A-Za-z0-9_-]{43}$/);
    const usage = await request(t.app).get('/v1/usage').set('Authorization', `Bearer ${lastLine}`).expect(200);
    expect(usage.body.planId).toBe('field');
    await request(t.app).post('/v1/runs').set('Authorization', `Bearer ${lastLine}`).send({}).expect((r) => expect([400, 403]).toContain(r.status));
  }, 240_000);

  it('fails with a message and a non-zero exit for bad input', async () => {
    await expect(admin('create-key', '--tenant', 'no-such-tenant')).rejects.toMatchObject({ code: 1, stderr: expect.stringContaining('no-such-tenant') });
    await expect(admin('create-key', '--tenant', 'wind-ridge', '--scopes', 'everything')).rejects.toMatchObject({ stderr: expect.stringContaining('unknown everything') });
    await expect(admin('create-tenant', 'wind-ridge')).rejects.toMatchObject({ stderr: expect.stringContaining('already exists') });
  }, 180_000);
});

describe('the demo seed', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await startTestApp();
  });
  afterAll(async () => t.close());

  it('seeds an empty database once, with working demo sign-ins and key', async () => {
    const seed = await seedDemo(t.ctx);
    expect(seed).not.toBeNull();
    for (const a of DEMO_ACCOUNTS) await request(t.app).post('/v1/auth/sign-in').send({ email: a.email, password: a.password }).expect(200);
    await request(t.app).get('/v1/usage').set('Authorization', `Bearer ${seed!.apiKey}`).expect(200);
    expect(await seedDemo(t.ctx)).toBeNull();
    expect(await t.ctx.db.getRepository(User).count()).toBe(DEMO_ACCOUNTS.length);
  });

  it('is refused in production', async () => {
    const production = { ...t.ctx, config: { ...t.ctx.config, production: true, nodeEnv: 'production' as const } };
    await expect(seedDemo(production)).rejects.toThrow(/NODE_ENV=production/);
  });
});

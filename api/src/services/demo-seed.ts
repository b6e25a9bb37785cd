// The local demo: an operator, one tenant with an owner, a developer and a viewer, and an API key.
// Only into an empty database and never in production. The demo runs are seeded after it, by
// `demo-runs.ts`, once a worker is there to solve them.
import type { AppContext } from '../context';
import { Tenant } from '../db/entities/tenant';
import { User } from '../db/entities/user';
import { SCOPES, type Role } from '../lib/roles-and-scopes';
import { createApiKey } from './api-keys';
import { createMember } from './members';
import { createTenant } from './tenants';

export interface DemoSeed {
  tenantId: string;
  tenantSlug: string;
  apiKey: string;
  accounts: { role: Role; email: string; password: string }[];
}

// Fixed on purpose so the README can list them; they exist only in local demo databases.
export const DEMO_ACCOUNTS: DemoSeed['accounts'] = [
  { role: 'operator', email: 'operator@gridwright.local', password: 'demo-operator-pass' },
  { role: 'owner', email: 'owner@demo.gridwright.local', password: 'demo-owner-pass' },
  { role: 'developer', email: 'developer@demo.gridwright.local', password: 'demo-developer-pass' },
  { role: 'viewer', email: 'viewer@demo.gridwright.local', password: 'demo-viewer-pass' },
];

export async function databaseIsEmpty(ctx: AppContext): Promise<boolean> {
  return (await ctx.db.getRepository(Tenant).count()) === 0 && (await ctx.db.getRepository(User).count()) === 0;
}

/** Seeds the demo and returns what it made, or null when the database already has tenants or people. */
export async function seedDemo(ctx: AppContext): Promise<DemoSeed | null> {
  if (ctx.config.production) throw new Error('The demo seed is refused when NODE_ENV=production.');
  if (!(await databaseIsEmpty(ctx))) return null;
  const tenant = await createTenant(ctx, { slug: 'demo', name: 'Demo Energy Park', planId: 'field' });
  await ctx.db.transaction(async (m) => {
    for (const a of DEMO_ACCOUNTS) {
      await createMember(ctx, m, { tenantId: a.role === 'operator' ? null : tenant.id, email: a.email, role: a.role, password: a.password, name: `Demo ${a.role}` });
    }
  });
  const { key } = await createApiKey(ctx, { tenantId: tenant.id, name: 'demo key', scopes: [...SCOPES] }, { email: 'seed' });
  return { tenantId: tenant.id, tenantSlug: tenant.slug, apiKey: key, accounts: DEMO_ACCOUNTS };
}

export function describeDemoSeed(seed: DemoSeed, url: string): string {
  const rows = seed.accounts.map((a) => `    ${a.role.padEnd(10)} ${a.email.padEnd(34)} ${a.password}`);
  return [
    '  Demo data seeded (local use only):',
    `    tenant     ${seed.tenantSlug}`,
    ...rows,
    `    API key    ${seed.apiKey}`,
    `    try:       curl -H "Authorization: Bearer ${seed.apiKey}" ${url}/v1/usage`,
    '',
  ].join('\n');
}

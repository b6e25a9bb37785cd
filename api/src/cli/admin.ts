// Operator commands: `npm run --silent admin -- <command> …` (against the same database as `npm start`).
import { randomBytes } from 'node:crypto';
import { parseArgs } from 'node:util';
import { createContext } from '../bootstrap';
import type { AppContext } from '../context';
import { HttpProblem } from '../lib/problem';
import { SCOPES, ROLES, type Role, type Scope } from '../lib/roles-and-scopes';
import { createApiKey } from '../services/api-keys';
import { createMember, inviteMember } from '../services/members';
import { createTenant, getTenantBySlug, setTenantSuspended, updateTenant } from '../services/tenants';

const USAGE = `Usage: npm run --silent admin -- <command>

  create-tenant <slug> [--plan P] [--name N]
  create-user <email> --role owner|developer|viewer|operator [--tenant <slug>] [--invite]
        prints a temporary password, or with --invite e-mails an invitation and prints its link
  create-key --tenant <slug> [--scopes runs:read,runs:write,…] [--name N] [--expires ISO-8601]
        prints the new API key alone on the last line
  set-plan <slug> <plan>
  suspend-tenant <slug> [--reason R]
  resume-tenant <slug>
`;

const OPERATOR = { email: 'admin-cli' };

function fail(message: string): never {
  throw new Error(message);
}

async function run(ctx: AppContext, argv: string[]) {
  const [command, ...rest] = argv;
  const { values, positionals } = parseArgs({
    args: rest,
    allowPositionals: true,
    options: {
      plan: { type: 'string' },
      name: { type: 'string' },
      tenant: { type: 'string' },
      role: { type: 'string' },
      scopes: { type: 'string' },
      expires: { type: 'string' },
      reason: { type: 'string' },
      invite: { type: 'boolean' },
    },
  });
  const out = (line: string) => process.stdout.write(line + '\n');
  switch (command) {
    case 'create-tenant': {
      const slug = positionals[0] ?? fail('create-tenant needs a slug');
      const t = await createTenant(ctx, { slug, name: values.name, planId: values.plan }, OPERATOR);
      out(`tenant ${t.slug} (${t.id}) on plan ${t.planId}`);
      return;
    }
    case 'create-user': {
      const email = positionals[0] ?? fail('create-user needs an e-mail address');
      const role = (values.role ?? fail('create-user needs --role')) as Role;
      if (!ROLES.includes(role)) fail(`--role must be one of ${ROLES.join(', ')}`);
      const tenant = role === 'operator' ? null : await getTenantBySlug(ctx.db.manager, values.tenant ?? fail('create-user needs --tenant <slug>'));
      if (values.invite) {
        if (!tenant || role === 'operator') fail('--invite is for tenant members');
        const { link } = await inviteMember(ctx, { tenantId: tenant.id, email, role, invitedBy: null }, OPERATOR);
        if (!link) fail(`${email} already has an account (an address belongs to one tenant); it was e-mailed a note, no link`);
        out(`invitation e-mailed to ${email}; link (single use):`);
        out(link);
        return;
      }
      const password = randomBytes(12).toString('base64url');
      const user = await ctx.db.transaction((m) => createMember(ctx, m, { tenantId: tenant?.id ?? null, email, role, password }));
      out(`user ${user.email} (${user.id}) role ${user.role}${tenant ? ` in ${tenant.slug}` : ''}; temporary password:`);
      out(password);
      return;
    }
    case 'create-key': {
      const tenant = await getTenantBySlug(ctx.db.manager, values.tenant ?? fail('create-key needs --tenant <slug>'));
      const scopes = (values.scopes ? values.scopes.split(',').map((s) => s.trim()) : [...SCOPES]) as Scope[];
      const unknown = scopes.filter((s) => !SCOPES.includes(s));
      if (unknown.length || scopes.length === 0) fail(`--scopes: unknown ${unknown.join(', ') || '(none given)'}; known: ${SCOPES.join(', ')}`);
      const expiresAt = values.expires ? new Date(values.expires) : null;
      if (expiresAt && Number.isNaN(expiresAt.getTime())) fail('--expires must be an ISO 8601 date-time');
      const { key, apiKey } = await createApiKey(ctx, { tenantId: tenant.id, name: values.name ?? 'cli key', scopes, expiresAt }, OPERATOR);
      out(`key ${apiKey.name} (${apiKey.id}) for ${tenant.slug}, scopes ${apiKey.scopes.join(',')}; shown once:`);
      out(key);
      return;
    }
    case 'set-plan': {
      const [slug, plan] = positionals;
      const tenant = await getTenantBySlug(ctx.db.manager, slug ?? fail('set-plan needs a slug and a plan'));
      const t = await updateTenant(ctx, tenant.id, { planId: plan ?? fail('set-plan needs a plan') }, OPERATOR);
      out(`tenant ${t.slug} now on plan ${t.planId}`);
      return;
    }
    case 'suspend-tenant':
    case 'resume-tenant': {
      const tenant = await getTenantBySlug(ctx.db.manager, positionals[0] ?? fail(`${command} needs a slug`));
      const t = await setTenantSuspended(ctx, tenant.id, command === 'suspend-tenant', values.reason ?? null, OPERATOR);
      out(`tenant ${t.slug} ${t.suspendedAt ? 'suspended' : 'active'}`);
      return;
    }
    default:
      fail(`unknown command "${command}"\n\n${USAGE}`);
  }
}

const argv = process.argv.slice(2);
if (argv.length === 0 || ['help', '--help', '-h'].includes(argv[0]!)) {
  process.stdout.write(USAGE);
  process.exit(0);
}
const ctx = await createContext();
let code = 0;
try {
  await run(ctx, argv);
} catch (err) {
  const message = err instanceof HttpProblem ? `${err.message}${err.errors ? ` (${err.errors.map((e) => `${e.pointer}: ${e.message}`).join('; ')})` : ''}` : (err as Error).message;
  process.stderr.write(`admin: ${message}\n`);
  code = 1;
} finally {
  await ctx.mailer.close();
  await ctx.db.destroy();
}
process.exit(code);

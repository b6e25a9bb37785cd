// THE permission matrix. Every route calls `authorize(action)` with one of these actions, every
// operation in openapi.yaml names its action in `x-permission`, the README table is rendered from
// here, and the role × route tests are generated from it.
import { ROLES, type Role, type Scope } from '../lib/roles-and-scopes';

export interface Permission {
  description: string;
  roles: readonly Role[];
  /** The API-key scope that grants the action to keys, or null when keys may never do it. */
  keyScope: Scope | null;
}

const TENANT_STAFF: readonly Role[] = ['owner', 'developer'];
const EVERYONE: readonly Role[] = ['owner', 'developer', 'viewer', 'operator'];

export const permissions = {
  'account.self': { description: 'Read and end one\'s own session, change one\'s own password', roles: EVERYONE, keyScope: null },
  'runs.read': { description: 'List and read runs, their results and exports', roles: EVERYONE, keyScope: 'runs:read' },
  'runs.create': { description: 'Submit runs', roles: TENANT_STAFF, keyScope: 'runs:write' },
  'runs.cancel': { description: 'Cancel queued or running runs', roles: TENANT_STAFF, keyScope: 'runs:write' },
  'series.read': { description: 'List and read uploaded series', roles: EVERYONE, keyScope: 'runs:read' },
  'series.create': { description: 'Upload series', roles: TENANT_STAFF, keyScope: 'series:write' },
  'webhooks.read': { description: 'List webhook endpoints and deliveries', roles: ['owner', 'developer', 'operator'], keyScope: 'webhooks:manage' },
  'webhooks.manage': { description: 'Create, change and delete webhook endpoints', roles: TENANT_STAFF, keyScope: 'webhooks:manage' },
  'exportProfiles.read': { description: 'List and read export profiles', roles: EVERYONE, keyScope: 'runs:read' },
  'exportProfiles.manage': { description: 'Create, change and delete export profiles', roles: TENANT_STAFF, keyScope: 'runs:write' },
  'keys.read': { description: 'List API keys (never their secrets)', roles: ['owner', 'developer', 'operator'], keyScope: null },
  'keys.manage': { description: 'Create and revoke API keys', roles: TENANT_STAFF, keyScope: null },
  'members.read': { description: 'List members and pending invitations', roles: ['owner', 'developer', 'operator'], keyScope: null },
  'members.manage': { description: 'Invite members, change roles, remove members', roles: ['owner', 'operator'], keyScope: null },
  'usage.read': { description: 'Read usage against the quota', roles: EVERYONE, keyScope: 'runs:read' },
  'audit.read': { description: "Read the tenant's audit log", roles: ['owner', 'operator'], keyScope: null },
  'tenant.read': { description: 'Read the tenant, its plan and limits; list plans', roles: EVERYONE, keyScope: 'runs:read' },
  'plan.manage': { description: "Change the tenant's plan (with billing on, through its subscription)", roles: ['owner', 'operator'], keyScope: null },
  'billing.read': { description: "Read the tenant's billing: subscription, card on file (brand and last digits), invoices, the next invoice", roles: ['owner', 'operator'], keyScope: null },
  'billing.manage': { description: 'Buy a plan, cancel or resume the subscription', roles: ['owner'], keyScope: null },
  'tenants.operate': { description: "Create, rename, suspend and resume tenants; set plans and overrides; grant plans without payment; read a tenant's billing", roles: ['operator'], keyScope: null },
  'outbox.read': { description: 'Read every e-mail the service sent', roles: ['operator'], keyScope: null },
} as const satisfies Record<string, Permission>;

export type Action = keyof typeof permissions;
export const ACTIONS = Object.keys(permissions) as Action[];

/**
 * Whether an operator must choose a tenant (X-Tenant-Id) first. Operator-only actions are about the
 * service itself and `account.self` about the person, so neither needs one.
 */
export const needsTenant = (action: Action) => action !== 'account.self' && !permissions[action].roles.every((r) => r === 'operator');

export function isAction(name: string): name is Action {
  return Object.prototype.hasOwnProperty.call(permissions, name);
}

export function roleAllows(role: Role, action: Action): boolean {
  return (permissions[action].roles as readonly Role[]).includes(role);
}

export function scopeAllows(scopes: readonly Scope[], action: Action): boolean {
  const scope = permissions[action].keyScope as Scope | null;
  return scope !== null && scopes.includes(scope);
}

export function actionsForRole(role: Role): Action[] {
  return ACTIONS.filter((a) => roleAllows(role, a));
}

/** The scopes a signed-in person effectively holds: every scope that grants at least one action of the role. */
export function scopesForRole(role: Role): Scope[] {
  const scopes = new Set<Scope>();
  for (const a of actionsForRole(role)) {
    const s = permissions[a].keyScope as Scope | null;
    if (s) scopes.add(s);
  }
  return [...scopes];
}

export const PERMISSIONS_START = '<!-- permissions:start -->';
export const PERMISSIONS_END = '<!-- permissions:end -->';

/** The matrix as a markdown table. `routes` maps actions to the operations (`GET /v1/…`) that need them. */
export function renderPermissionTable(routes: Partial<Record<Action, string[]>> = {}): string {
  const head = ['Action', 'What it allows', ...ROLES, 'API key scope', 'Routes'];
  const lines = [`| ${head.join(' | ')} |`, `|${head.map(() => ' --- ').join('|')}|`];
  for (const action of ACTIONS) {
    const p: Permission = permissions[action];
    const cells = [
      `\`${action}\``,
      p.description,
      ...ROLES.map((r) => (p.roles.includes(r) ? '✓' : '—')),
      p.keyScope ? `\`${p.keyScope}\`` : 'keys may not',
      (routes[action] ?? []).map((r) => `\`${r}\``).join('<br>'),
    ];
    lines.push(`| ${cells.join(' | ')} |`);
  }
  return lines.join('\n');
}

/** Replaces the text between the README markers with the table; throws when the markers are missing. */
export function replacePermissionTable(readme: string, table: string): string {
  const start = readme.indexOf(PERMISSIONS_START);
  const end = readme.indexOf(PERMISSIONS_END);
  if (start < 0 || end < start) throw new Error(`README.md needs the markers ${PERMISSIONS_START} and ${PERMISSIONS_END}.`);
  return `${readme.slice(0, start + PERMISSIONS_START.length)}\n${table}\n${readme.slice(end)}`;
}

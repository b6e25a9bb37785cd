// The roles people hold and the scopes API keys carry: stored in rows (users, invitations, api_keys)
// and judged by auth/, so they live below both.
export type TenantRole = 'owner' | 'developer' | 'viewer';
export type Role = TenantRole | 'operator';
export type Scope = 'runs:read' | 'runs:write' | 'series:write' | 'webhooks:manage';

export const TENANT_ROLES: readonly TenantRole[] = ['owner', 'developer', 'viewer'];
export const ROLES: readonly Role[] = ['owner', 'developer', 'viewer', 'operator'];
export const SCOPES: readonly Scope[] = ['runs:read', 'runs:write', 'series:write', 'webhooks:manage'];

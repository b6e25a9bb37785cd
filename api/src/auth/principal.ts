// Who is acting on a request, as established by `authenticate` (middleware.ts).
export type TenantRole = 'owner' | 'developer' | 'viewer';
export type Role = TenantRole | 'operator';
export type Scope = 'runs:read' | 'runs:write' | 'series:write' | 'webhooks:manage';

export const TENANT_ROLES: readonly TenantRole[] = ['owner', 'developer', 'viewer'];
export const ROLES: readonly Role[] = ['owner', 'developer', 'viewer', 'operator'];
export const SCOPES: readonly Scope[] = ['runs:read', 'runs:write', 'series:write', 'webhooks:manage'];

export interface Principal {
  kind: 'api-key' | 'session';
  /** The tenant acted on. Operators: the tenant chosen with the `X-Tenant-Id` header, or '' when none is chosen. */
  tenantId: string;
  role: Role;
  userId?: string;
  apiKeyId?: string;
  sessionId?: string;
  /** API keys: their scopes; sessions: every scope the role allows. */
  scopes: Scope[];
}

declare module 'express-serve-static-core' {
  interface Request {
    principal?: Principal;
  }
}

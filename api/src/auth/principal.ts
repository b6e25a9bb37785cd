// Who is acting on a request, as established by `authenticate` (middleware.ts).
import type { Role, Scope } from '../lib/roles-and-scopes';

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

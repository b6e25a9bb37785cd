import type { Request, RequestHandler } from 'express';
import type { AppContext } from '../context';
import type { Tenant } from '../db/entities/tenant';
import { HttpProblem } from '../lib/problem';
import { safeEqual } from '../lib/secret-tokens';
import { verifyApiKey } from '../services/api-keys';
import { enforceRequestRate } from '../services/rate-limits';
import { CSRF_COOKIE, CSRF_HEADER, SESSION_COOKIE, resolveSession } from '../services/sessions';
import { effectiveLimits, findTenantAndPlan } from '../services/tenants';
import { needsTenant, permissions, roleAllows, scopeAllows, scopesForRole, type Action } from './permissions';
import type { Principal } from './principal';

export const TENANT_HEADER = 'x-tenant-id';
const SAFE_METHODS = new Set(['GET', 'HEAD', 'OPTIONS']);

export const unauthenticated = (detail: string) =>
  new HttpProblem({
    status: 401,
    slug: 'unauthenticated',
    title: 'Not signed in',
    detail,
    headers: { 'WWW-Authenticate': 'Bearer realm="gridwright"' },
  });

export const tenantSuspended = (tenant: Tenant) =>
  new HttpProblem({
    status: 403,
    slug: 'tenant-suspended',
    title: 'Tenant suspended',
    detail: `The tenant "${tenant.slug}" is suspended${tenant.suspendedReason ? ` (${tenant.suspendedReason})` : ''}; its keys and sessions are refused until an operator resumes it.`,
  });

async function tenantWithLimits(ctx: AppContext, tenantId: string) {
  const found = await findTenantAndPlan(ctx, tenantId);
  return found && { tenant: found.tenant, limits: effectiveLimits(found.plan, found.tenant.limitOverrides) };
}

async function fromApiKey(ctx: AppContext, header: string): Promise<{ principal: Principal; rps: number }> {
  const m = /^Bearer\s+(\S+)\s*$/i.exec(header);
  if (!m) throw unauthenticated('The Authorization header must be "Bearer <API key>".');
  const found = await verifyApiKey(ctx, m[1]!);
  if (!found.ok) throw unauthenticated(found.reason);
  const t = await tenantWithLimits(ctx, found.apiKey.tenantId);
  if (!t) throw unauthenticated('The API key is not known.');
  if (t.tenant.suspendedAt) throw tenantSuspended(t.tenant);
  return {
    // Keys are authorized by scope alone; `developer` is only what `role` reports for them.
    principal: { kind: 'api-key', tenantId: t.tenant.id, role: 'developer', apiKeyId: found.apiKey.id, scopes: found.apiKey.scopes },
    rps: t.limits.requestsPerSecond,
  };
}

function checkCsrf(req: Request, expected: string) {
  if (SAFE_METHODS.has(req.method)) return;
  const header = req.get(CSRF_HEADER);
  const cookie: unknown = req.cookies?.[CSRF_COOKIE];
  if (!header || typeof cookie !== 'string' || !safeEqual(header, cookie) || !safeEqual(header, expected)) {
    throw new HttpProblem({
      status: 403,
      slug: 'csrf-failed',
      title: 'CSRF check failed',
      detail: `Requests that change something in a signed-in session need the ${CSRF_HEADER} header equal to the ${CSRF_COOKIE} cookie.`,
    });
  }
}

async function fromSession(ctx: AppContext, req: Request, token: string): Promise<{ principal: Principal; rps: number | null }> {
  const found = await resolveSession(ctx, token);
  if (!found.ok) throw unauthenticated(found.reason);
  checkCsrf(req, found.session.csrfToken);
  const { user, session } = found;
  const base = { kind: 'session' as const, role: user.role, userId: user.id, sessionId: session.id, scopes: scopesForRole(user.role) };
  if (user.role === 'operator') {
    const chosen = req.get(TENANT_HEADER);
    if (!chosen) return { principal: { ...base, tenantId: '' }, rps: null };
    const t = await findTenantAndPlan(ctx, chosen);
    if (!t) throw new HttpProblem({ status: 404, slug: 'not-found', title: 'Not found', detail: `Tenant ${chosen} (${TENANT_HEADER} header) was not found.` });
    return { principal: { ...base, tenantId: t.tenant.id }, rps: null };
  }
  const t = await tenantWithLimits(ctx, user.tenantId!);
  if (!t) throw unauthenticated('The session is not known.');
  if (t.tenant.suspendedAt) throw tenantSuspended(t.tenant);
  return { principal: { ...base, tenantId: t.tenant.id }, rps: t.limits.requestsPerSecond };
}

/** Bearer API key, or the session cookie (with the CSRF check on unsafe methods). Sets `req.principal`. */
export function authenticate(ctx: AppContext): RequestHandler {
  return async (req, res, next) => {
    // Already established before the body was read (authenticate-first.ts): once per request.
    if (req.principal) return next();
    const header = req.get('authorization');
    const cookie: unknown = req.cookies?.[SESSION_COOKIE];
    let established: { principal: Principal; rps: number | null };
    if (header) established = await fromApiKey(ctx, header);
    else if (typeof cookie === 'string' && cookie) established = await fromSession(ctx, req, cookie);
    else throw unauthenticated('Send "Authorization: Bearer <API key>" or sign in.');
    req.principal = established.principal;
    // Operators act for the service and are not metered against a tenant's plan.
    if (established.rps !== null) {
      await enforceRequestRate(ctx, res, {
        tenantId: established.principal.tenantId,
        credential: established.principal.apiKeyId ? `key:${established.principal.apiKeyId}` : `user:${established.principal.userId}`,
        requestsPerSecond: established.rps,
      });
    }
    next();
  };
}

export type AuthorizeHandler = RequestHandler & { action: Action };

/** Refuses with 403 unless the principal's role (sessions) or scopes (API keys) allow `action`. */
export function authorize(action: Action): AuthorizeHandler {
  const p = permissions[action];
  const handler: RequestHandler = (req, _res, next) => {
    const principal = req.principal;
    if (!principal) throw unauthenticated('Send "Authorization: Bearer <API key>" or sign in.');
    const allowed = principal.kind === 'api-key' ? scopeAllows(principal.scopes, action) : roleAllows(principal.role, action);
    if (!allowed) {
      const detail =
        principal.kind === 'api-key'
          ? p.keyScope
            ? `This API key lacks the scope "${p.keyScope}" that ${action} needs.`
            : `API keys may not do ${action}; it needs a signed-in ${p.roles.join(' or ')}.`
          : `Your role (${principal.role}) may not do ${action}; it needs ${p.roles.join(' or ')}.`;
      throw new HttpProblem({
        status: 403,
        slug: 'forbidden',
        title: 'Not allowed',
        detail,
        extensions: { action, requiredRoles: p.roles, requiredScope: p.keyScope },
      });
    }
    if (principal.role === 'operator' && !principal.tenantId && needsTenant(action)) {
      throw new HttpProblem({
        status: 400,
        slug: 'tenant-not-selected',
        title: 'No tenant selected',
        detail: `Operators choose the tenant for ${action} with the ${TENANT_HEADER} header.`,
        errors: [{ pointer: `/headers/${TENANT_HEADER}`, message: 'required for operators' }],
      });
    }
    next();
  };
  return Object.assign(handler, { action });
}

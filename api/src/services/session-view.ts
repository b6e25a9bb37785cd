import type { Principal } from '../auth/principal';
import { actionsForRole } from '../auth/permissions';
import type { AppContext } from '../context';
import type { Session } from '../db/entities/session';
import { Tenant } from '../db/entities/tenant';
import type { User } from '../db/entities/user';
import { userView } from './members';
import { tenantView } from './tenants';

/** What the console needs to know about the signed-in person. */
export async function sessionView(ctx: AppContext, user: User, session: Session, principal?: Principal) {
  const tenantId = principal?.tenantId || user.tenantId;
  const tenant = tenantId ? await ctx.db.getRepository(Tenant).findOneBy({ id: tenantId }) : null;
  return {
    user: userView(user),
    tenant: tenant ? await tenantView(ctx.db.manager, tenant) : null,
    role: user.role,
    permissions: actionsForRole(user.role),
    csrfToken: session.csrfToken,
    expiresAt: session.expiresAt.toISOString(),
  };
}

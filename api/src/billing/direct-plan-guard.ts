import type { EntityManager } from 'typeorm';
import { HttpProblem } from '../lib/problem';
import { PAYING_STATUSES } from './subscription-statuses';

/**
 * Refuses to set a plan directly (an operator's PATCH, the admin CLI) while it is decided elsewhere: by
 * a subscription the tenant pays for (the next provider event would undo it) or by an operator's grant.
 */
export async function assertPlanSetDirectly(manager: EntityManager, tenantId: string): Promise<void> {
  const [row]: { granted_plan_id: string | null; paying: boolean }[] = await manager.query(
    `SELECT granted_plan_id, subscription_status = ANY($2) AS paying FROM billing_accounts WHERE tenant_id = $1`,
    [tenantId, PAYING_STATUSES],
  );
  if (row?.granted_plan_id) {
    throw new HttpProblem({
      status: 409,
      slug: 'plan-granted',
      title: 'The plan is granted',
      detail: `The tenant's plan (${row.granted_plan_id}) is an operator's grant; change it with PUT /v1/admin/tenants/{id}/plan-grant.`,
      errors: [{ pointer: '/planId', message: 'set by a plan grant' }],
    });
  }
  if (row?.paying) {
    throw new HttpProblem({
      status: 409,
      slug: 'plan-follows-subscription',
      title: 'The plan follows a subscription',
      detail: "The tenant pays for its plan through a subscription; its owner changes it, or an operator grants a plan with PUT /v1/admin/tenants/{id}/plan-grant.",
      errors: [{ pointer: '/planId', message: 'set by the subscription' }],
    });
  }
}

import type { EntityManager } from 'typeorm';
import type { Config } from '../config';
import { PAYING_STATUSES } from './subscription-statuses';

/**
 * Whether solver-seconds above the plan's allowance are billed as metered usage instead of refused:
 * for a tenant paying through a subscription (not one on a granted plan), when billing is on.
 */
export async function solverOverageBilled(config: Pick<Config, 'billing'>, manager: EntityManager, tenantId: string): Promise<boolean> {
  if (!config.billing) return false;
  const [row] = await manager.query(
    `SELECT 1 FROM billing_accounts WHERE tenant_id = $1 AND subscription_status = ANY($2) AND granted_plan_id IS NULL`,
    [tenantId, PAYING_STATUSES],
  );
  return row !== undefined;
}
